import { describe, expect, it } from 'vitest';
import { loadOpenCv } from '../../../../app/node/load-opencv';
import { estimateCenter } from '../../../../core/rings/center-estimate';
import { maskBeamStop } from '../../../../core/rings/mask-beam-stop';
import { emptyMask } from '../../../../core/rings/pixel-mask';
import { makeRingImage } from './ring-test-image';

const cv = loadOpenCv();

describe('estimateCenter', () => {
  it('finds the centre behind a beam stop that hides it, to within a pixel (seed 61)', () => {
    const frame = { centerXPx: 400.4, centerYPx: 398.2, axisRatio: 1.02, angleDeg: 10 };
    const img = makeRingImage({
      width: 800, height: 800, frame,
      rings: [{ radiusPx: 140, sigmaPx: 2, peakCounts: 300 }, { radiusPx: 230, sigmaPx: 2.5, peakCounts: 200 }, { radiusPx: 330, sigmaPx: 3, peakCounts: 150 }],
      background: { levelCounts: 20, centralCounts: 800, decayPx: 150 },
      beamStop: { xPx: 404, yPx: 394, radiusPx: 50, stemAngleDeg: 120, stemWidthPx: 20, levelCounts: 3 }, seed: 61,
    });
    const stop = maskBeamStop(img.raster, cv);
    const c = estimateCenter(img.raster, stop.mask, cv);
    if (!c.ok) throw new Error(c.reason);
    expect(Math.hypot(c.centerXPx - 400.4, c.centerYPx - 398.2)).toBeLessThan(1);
    expect(c.support).toBeGreaterThan(10 * c.chanceSupport);
  });

  it('finds a centre 150 px outside the image from arcs alone, to within 15 px (seed 62)', () => {
    // Measured: about 9 px. Normals of a distorted ellipse miss the centre by up to (q - 1) R / 2
    // (here 4 px), and with arcs on one side only the misses do not cancel; refineFrame removes them.
    const frame = { centerXPx: -150.7, centerYPx: 300.2, axisRatio: 1.01, angleDeg: 10 };
    const img = makeRingImage({ width: 640, height: 640, frame, rings: [{ radiusPx: 300, sigmaPx: 3, peakCounts: 200 }, { radiusPx: 450, sigmaPx: 3, peakCounts: 150 }, { radiusPx: 600, sigmaPx: 3, peakCounts: 150 }], background: { levelCounts: 20, centralCounts: 800, decayPx: 300 }, seed: 62 });
    const c = estimateCenter(img.raster, undefined, cv);
    if (!c.ok) throw new Error(c.reason);
    expect(Math.hypot(c.centerXPx + 150.7, c.centerYPx - 300.2)).toBeLessThan(15);
  });

  it('says no centre stands out in an image of noise alone (seed 63)', () => {
    const img = makeRingImage({ width: 400, height: 400, frame: { centerXPx: 200, centerYPx: 200, axisRatio: 1, angleDeg: 0 }, rings: [], background: { levelCounts: 100, centralCounts: 0, decayPx: 1 }, seed: 63 });
    const c = estimateCenter(img.raster, undefined, cv);
    expect(c.ok).toBe(false);
    if (!c.ok) expect(c.reason).toMatch(/no centre stands out/);
  });

  it('reports a fully masked image as a value and refuses a mask of another size', () => {
    const raster = { width: 100, height: 100, data: new Float32Array(10000).fill(5) };
    const all = emptyMask(100, 100);
    all.excluded.fill(1);
    expect(estimateCenter(raster, all, cv)).toMatchObject({ ok: false, reason: /too few unmasked pixels/ });
    expect(() => estimateCenter(raster, emptyMask(50, 50), cv)).toThrow(/mask is 50 x 50/);
    expect(() => estimateCenter(raster, undefined, cv, { workingSizePx: 10 })).toThrow(/workingSizePx must be 64 to 2048/);
  });
});
