/**
 * The worker pool runs core's row-band passes on other threads and gives what the
 * single-threaded path gives: the radial profile, the texture, the hot-pixel mask
 * and a whole measureRings, on a simulated pattern (seed 701).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startRowBandPool, type RowBandPool } from '../../../../app/node/row-band-pool';
import { findPhase } from '../../../../core/crystal';
import { integrateRadialProfile } from '../../../../core/rings/azimuthal-integration';
import { integrateAzimuthalTexture } from '../../../../core/rings/azimuthal-texture';
import { integrationFrame } from '../../../../core/rings/integration-geometry';
import { maskHotPixels } from '../../../../core/rings/mask-hot-pixels';
import { maskSaturated } from '../../../../core/rings/mask-saturated';
import { measureRings } from '../../../../core/rings/measure-rings';
import { refineFrame } from '../../../../core/rings/refine-frame';
import { splitRows } from '../../../../core/rings/row-bands';
import { simulatePattern } from '../../../../core/simulate';

const { raster, truth } = simulatePattern({
  widthPx: 640,
  heightPx: 600,
  voltageV: 200e3,
  cameraLengthPx: 9000,
  frame: { centerXPx: 311.4, centerYPx: 297.7, axisRatio: 1.015, angleDeg: 40 },
  phases: [{ phase: findPhase('Au')! }],
  peakCounts: 300,
  ringFwhmPx: 3,
  beamStop: {},
  hotPixels: { count: 40 },
  seed: 701,
});
const stop = truth.beamStop!;
const mask = { width: 640, height: 600, excluded: new Uint8Array(640 * 600) };
for (let j = 0; j < 600; j++) for (let i = 0; i < 640; i++) if (Math.hypot(i - stop.centerXPx, j - stop.centerYPx) < stop.radiusPx + 3) mask.excluded[j * 640 + i] = 1;

let pool: RowBandPool;
beforeAll(async () => {
  pool = startRowBandPool({ threads: 2 });
  await pool.ready();
});
afterAll(async () => {
  await pool.close();
});

describe('startRowBandPool', () => {
  it('boots its threads and cuts passes into as many bands', () => {
    expect(pool.liveThreads()).toBe(2);
    expect(pool.bandCount).toBe(2);
  });

  it('gives the radial profile of this thread: the same areas and means, stdErr to 1e-9', () => {
    const g = integrationFrame(640, 600, truth.frame);
    const here = integrateRadialProfile(raster, mask, g, { rMinPx: 20 });
    const there = integrateRadialProfile(pool.share(raster), mask, g, { rMinPx: 20 }, pool);
    expect(Array.from(there.area)).toEqual(Array.from(here.area));
    expect(Array.from(there.mean)).toEqual(Array.from(here.mean));
    here.stdErr.forEach((e, k) => {
      if (Number.isFinite(e)) expect(Math.abs(there.stdErr[k]! - e)).toBeLessThanOrEqual(1e-9 * e);
    });
  });

  // 1024 x 560 px: large enough for two bands of MIN_BAND_PIXELS (640 x 600 runs in one).
  const wide = simulatePattern({
    widthPx: 1024,
    heightPx: 560,
    voltageV: 200e3,
    cameraLengthPx: 9000,
    frame: { centerXPx: 500.6, centerYPx: 271.3, axisRatio: 1.012, angleDeg: 25 },
    phases: [{ phase: findPhase('Au')! }],
    peakCounts: 300,
    ringFwhmPx: 3,
    seed: 702,
  });
  /** The pool, counting the bands it was handed. */
  const counted = { bands: 0, get bandCount() { return pool.bandCount; }, run: ((pass, images, params, bands) => { counted.bands += bands.length; return pool.run(pass, images, params, bands); }) as RowBandPool['run'] };

  it('copies unshared images afresh for every run: two masks of one size in turn give their own profiles', () => {
    const g = integrationFrame(1024, 560, wide.truth.frame);
    const left = { width: 1024, height: 560, excluded: new Uint8Array(1024 * 560) };
    const right = { width: 1024, height: 560, excluded: new Uint8Array(1024 * 560) };
    for (let p = 0; p < left.excluded.length; p++) (p % 1024 < 512 ? left : right).excluded[p] = 1;
    counted.bands = 0;
    for (const m of [left, right, left]) {
      const here = integrateRadialProfile(wide.raster, m, g, { rMinPx: 20 });
      const there = integrateRadialProfile(wide.raster, m, g, { rMinPx: 20 }, counted);
      expect(Array.from(there.area)).toEqual(Array.from(here.area));
      expect(Array.from(there.mean)).toEqual(Array.from(here.mean));
    }
    expect(counted.bands).toBe(6);
    expect(left.excluded.buffer instanceof SharedArrayBuffer).toBe(false);
  });

  it('gives refineFrame the frame of this thread (centre estimate, ring search and ring points on bands; to 1e-9 px)', () => {
    const start = { centerXPx: 502, centerYPx: 270, axisRatio: 1, angleDeg: 0 };
    counted.bands = 0;
    const here = refineFrame(wide.raster, undefined, { start });
    const there = refineFrame(pool.share(wide.raster), undefined, { start, rowBands: counted });
    expect(counted.bands).toBeGreaterThanOrEqual(2 * 4); // a ring search and at least three rounds of ring points
    expect(here.ok && there.ok).toBe(true);
    if (!here.ok || !there.ok) return;
    expect(Math.abs(there.frame.centerXPx - here.frame.centerXPx)).toBeLessThan(1e-9);
    expect(Math.abs(there.frame.centerYPx - here.frame.centerYPx)).toBeLessThan(1e-9);
    expect(Math.abs(there.frame.axisRatio - here.frame.axisRatio)).toBeLessThan(1e-12);
    expect(there.rings.map((r) => r.keptCount)).toEqual(here.rings.map((r) => r.keptCount));
    expect(Math.hypot(here.frame.centerXPx - wide.truth.frame.centerXPx, here.frame.centerYPx - wide.truth.frame.centerYPx)).toBeLessThan(0.05);
  });

  it('gives the texture and the hot-pixel mask of this thread', () => {
    const g = integrationFrame(640, 600, truth.frame);
    const bands = truth.rings.slice(0, 4).map((r) => ({ innerRadiusPx: r.radiusPx - 3, outerRadiusPx: r.radiusPx + 3 }));
    const a = integrateAzimuthalTexture(raster, mask, g, { bands });
    const b = integrateAzimuthalTexture(raster, mask, g, { bands }, pool);
    expect(Array.from(b.mean)).toEqual(Array.from(a.mean));
    expect(Array.from(b.area)).toEqual(Array.from(a.area));
    const saturated = maskSaturated(raster, { bitsPerSample: 16 });
    const hotHere = maskHotPixels(raster, saturated.mask);
    const hotThere = maskHotPixels(raster, saturated.mask, {}, pool);
    expect(hotThere.hotCount).toBe(hotHere.hotCount);
    expect(hotThere.hotCount).toBeGreaterThanOrEqual(40);
    expect(Array.from(hotThere.mask.excluded)).toEqual(Array.from(hotHere.mask.excluded));
  });

  it('gives measureRings the same rings (radii and sigmas to 1e-9 px)', () => {
    const here = measureRings(raster, mask, truth.frame, { rMinPx: stop.radiusPx + 4 });
    const there = measureRings(raster, mask, truth.frame, { rMinPx: stop.radiusPx + 4, rowBands: pool });
    expect(there.rings.length).toBe(here.rings.length);
    expect(here.rings.length).toBeGreaterThanOrEqual(4);
    here.rings.forEach((r, i) => {
      expect(Math.abs(there.rings[i]!.radiusPx - r.radiusPx)).toBeLessThan(1e-9);
      expect(Math.abs(there.rings[i]!.radiusSigmaPx - r.radiusSigmaPx)).toBeLessThan(1e-9);
      expect(Math.abs(there.rings[i]!.continuity - r.continuity)).toBeLessThan(1e-9);
    });
  });

  it('passes a thread\'s error on with its class, and refuses an unknown pass', () => {
    const images = { raster: pool.share(raster), mask: null };
    // References without values fail only where a pixel reaches a band: here only in the thread's band.
    const plan = {
      geometry: integrationFrame(640, 600, truth.frame),
      bands: [{ innerRadiusPx: 100, outerRadiusPx: 110 }],
      azimuthBinCount: 8,
      subdivision: 3,
      references: [{ rMinPx: 0, binWidthPx: 0.5, values: null as unknown as Float64Array }],
    };
    expect(() => pool.run('azimuthalTexture', images, plan, [{ rowStart: 0, rowEnd: 0 }, { rowStart: 0, rowEnd: 600 }])).toThrow(TypeError);
    expect(() => pool.run('noSuchPass' as 'radialProfile', images, undefined as never, splitRows(600, 2))).toThrow(/unknown row-band pass "noSuchPass"/);
    // The thread still answers afterwards.
    const g = integrationFrame(640, 600, truth.frame);
    expect(Array.from(integrateRadialProfile(raster, mask, g, {}, pool).area)).toEqual(Array.from(integrateRadialProfile(raster, mask, g).area));
  });

  it('runs every band here once closed, with the same result', async () => {
    const g = integrationFrame(640, 600, truth.frame);
    const before = integrateRadialProfile(raster, mask, g, { rMinPx: 20 }, pool);
    const spare = startRowBandPool({ threads: 2 });
    await spare.close();
    expect(spare.liveThreads()).toBe(1);
    const after = integrateRadialProfile(raster, mask, g, { rMinPx: 20 }, spare);
    expect(Array.from(after.mean)).toEqual(Array.from(before.mean));
    expect(() => startRowBandPool({ threads: 0 })).toThrow(/threads must be an integer from 1 to 64; got 0/);
  });

  it('shares an image in shared memory without changing it', () => {
    const shared = pool.share(raster);
    expect(shared.data.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(Array.from(shared.data.subarray(0, 1000))).toEqual(Array.from(raster.data.subarray(0, 1000)));
    expect(pool.share(shared).data).toBe(shared.data);
  });
});
