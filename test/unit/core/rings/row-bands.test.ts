import { describe, expect, it } from 'vitest';
import { MIN_BAND_PIXELS, runRowBands, splitRows, type RowBand, type RowBandRunner } from '../../../../core/rings/row-bands';
import { hotPixelCandidateRows } from '../../../../core/rings/mask-hot-pixels';
import { maskHotPixels } from '../../../../core/rings/mask-hot-pixels';
import { ROW_BAND_PASSES } from '../../../../core/rings/row-band-passes';
import { makeRingImage } from './ring-test-image';
import { centerBlockRowsPass } from '../../../../core/rings/center-estimate';
import { findRingCandidates } from '../../../../core/rings/ring-candidates';
import { sampleRingPoints } from '../../../../core/rings/ring-points';

describe('splitRows', () => {
  it('cuts [0, height) into consecutive bands as equal as whole rows allow', () => {
    expect(splitRows(10, 3)).toEqual([{ rowStart: 0, rowEnd: 3 }, { rowStart: 3, rowEnd: 7 }, { rowStart: 7, rowEnd: 10 }]);
    expect(splitRows(2, 5)).toEqual([{ rowStart: 0, rowEnd: 1 }, { rowStart: 1, rowEnd: 2 }]);
    expect(splitRows(0, 2)).toEqual([{ rowStart: 0, rowEnd: 0 }]);
    for (const [h, n] of [[4096, 2], [1001, 7], [5, 5]] as const) {
      const bands = splitRows(h, n);
      expect(bands[0]!.rowStart).toBe(0);
      expect(bands[bands.length - 1]!.rowEnd).toBe(h);
      bands.forEach((b, k) => { if (k > 0) expect(b.rowStart).toBe(bands[k - 1]!.rowEnd); });
      expect(Math.max(...bands.map((b) => b.rowEnd - b.rowStart)) - Math.min(...bands.map((b) => b.rowEnd - b.rowStart))).toBeLessThanOrEqual(1);
    }
  });
  it('refuses a negative height or a band count below 1', () => {
    expect(() => splitRows(-1, 2)).toThrow(/height must be an integer >= 0; got -1/);
    expect(() => splitRows(10, 0)).toThrow(/count must be an integer >= 1; got 0/);
  });
});

describe('runRowBands', () => {
  /** A runner that records the bands it was given and runs them one after another here. */
  function recorder(bandCount: number): RowBandRunner & { seen: RowBand[][] } {
    const seen: RowBand[][] = [];
    return {
      bandCount,
      seen,
      run(pass, images, params, bands) {
        seen.push([...bands]);
        const fn = ROW_BAND_PASSES[pass] as (i: typeof images, p: typeof params, b: RowBand) => ReturnType<(typeof ROW_BAND_PASSES)[typeof pass]>;
        return bands.map((b) => fn(images, params, b));
      },
    };
  }
  const img = makeRingImage({ width: 1024, height: 520, frame: { centerXPx: 500.2, centerYPx: 260.7, axisRatio: 1, angleDeg: 0 }, rings: [], background: { levelCounts: 50, centralCounts: 0, decayPx: 1 }, hotPixels: { count: 30, valueCounts: 3000 }, seed: 801 });

  it('runs here in one band without a runner, for a small image, or for a runner of one thread', () => {
    const tiny = recorder(4);
    const small = makeRingImage({ width: 100, height: 100, frame: { centerXPx: 50, centerYPx: 50, axisRatio: 1, angleDeg: 0 }, rings: [], background: { levelCounts: 50, centralCounts: 0, decayPx: 1 }, seed: 802 });
    maskHotPixels(small.raster, undefined, {}, tiny);
    maskHotPixels(img.raster, undefined, {}, recorder(1));
    expect(tiny.seen).toEqual([]);
    expect(100 * 100).toBeLessThan(2 * MIN_BAND_PIXELS);
  });

  it('hands a large image to the runner in bands, and the hot-pixel lists of the bands concatenate to the single pass (seed 801)', () => {
    const r = recorder(3);
    const banded = maskHotPixels(img.raster, undefined, {}, r);
    const single = maskHotPixels(img.raster);
    expect(r.seen).toEqual([splitRows(520, 2)]); // 1024 x 520 px holds two bands of MIN_BAND_PIXELS
    expect(Array.from(banded.mask.excluded)).toEqual(Array.from(single.mask.excluded));
    expect(single.hotCount).toBe(new Set(img.hotPixelIndices).size);
    const t = { k: 6, readVariance: single.noise.readVariance, varianceSlope: single.noise.varianceSlope, floorVariance: Math.max(single.noise.minimumVariance, 0.25) };
    const whole = Array.from(hotPixelCandidateRows(img.raster, null, t, 0, 520));
    const parts = splitRows(520, 5).flatMap((b) => Array.from(hotPixelCandidateRows(img.raster, null, t, b.rowStart, b.rowEnd)));
    expect(parts).toEqual(whole);
    expect(whole.length).toBeGreaterThanOrEqual(30);
  });

  it('runs the local pass when given no runner', () => {
    const calls: RowBand[] = [];
    const out = runRowBands(undefined, 'hotPixelCandidates', { raster: img.raster, mask: null }, { k: 6, readVariance: 0, varianceSlope: 1, floorVariance: 1 }, 520, (_i, _p, band) => { calls.push(band); return new Int32Array(0); });
    expect(calls).toEqual([{ rowStart: 0, rowEnd: 520 }]);
    expect(out.length).toBe(1);
  });
});

describe('geometry passes on bands of rows', () => {
  function recorder(bandCount: number): RowBandRunner & { seen: RowBand[][] } {
    const seen: RowBand[][] = [];
    return {
      bandCount,
      seen,
      run(pass, images, params, bands) {
        seen.push([...bands]);
        const fn = ROW_BAND_PASSES[pass] as (i: typeof images, p: typeof params, b: RowBand) => ReturnType<(typeof ROW_BAND_PASSES)[typeof pass]>;
        return bands.map((b) => fn(images, params, b));
      },
    };
  }
  const frame = { centerXPx: 500.3, centerYPx: 380.6, axisRatio: 1.015, angleDeg: 40 };
  const rings = [{ radiusPx: 120, sigmaPx: 1.6, peakCounts: 300 }, { radiusPx: 260, sigmaPx: 2, peakCounts: 200 }];
  const img = makeRingImage({ width: 1000, height: 800, frame, rings, background: { levelCounts: 40, centralCounts: 300, decayPx: 150 }, seed: 805 });

  it('ring points: the banded cell sums give the points of one thread (integer data: to rounding of the radius sums; seed 805)', () => {
    const windows = rings.map((r) => ({ radiusPx: r.radiusPx + 0.4, sigmaPx: r.sigmaPx, halfWindowPx: 4 * r.sigmaPx }));
    for (const stride of [1, 2]) {
      const runner = recorder(3);
      const banded = sampleRingPoints(img.raster, undefined, frame, windows, { pixelStride: stride }, runner);
      const single = sampleRingPoints(img.raster, undefined, frame, windows, { pixelStride: stride });
      expect(runner.seen).toEqual([splitRows(800, 3)]);
      banded.forEach((b, k) => {
        const s = single[k]!;
        expect(b.xPx.length).toBe(s.xPx.length);
        expect(b.xPx.length).toBeGreaterThan(0.9 * b.wedgeCount);
        for (let i = 0; i < b.xPx.length; i++) {
          expect(Math.abs(b.xPx[i]! - s.xPx[i]!)).toBeLessThan(1e-9);
          expect(Math.abs(b.sigmaPx[i]! - s.sigmaPx[i]!)).toBeLessThan(1e-9);
        }
      });
    }
  });

  it('ring search: the banded profile sums give the same candidates (seed 805)', () => {
    const runner = recorder(2);
    const banded = findRingCandidates(img.raster, undefined, frame, { rowBands: runner, pixelStride: 3, minRadiusPx: 60 });
    const single = findRingCandidates(img.raster, undefined, frame, { pixelStride: 3, minRadiusPx: 60 });
    expect(runner.seen).toEqual([splitRows(800, 2)]);
    expect(banded.rings).toEqual(single.rings);
    for (const r of rings) expect(banded.rings.some((c) => Math.abs(c.radiusPx - r.radiusPx) < 1)).toBe(true);
  });

  it('centre estimate: block sums over bands of whole block rows concatenate to those of one band', () => {
    const f = 7;
    const whole = centerBlockRowsPass({ raster: img.raster, mask: null }, { blockPx: f }, { rowStart: 0, rowEnd: 800 });
    const blockRows = Math.ceil(800 / f);
    const cw = Math.ceil(1000 / f);
    expect(whole.sum.length).toBe(cw * blockRows);
    const sums: number[] = [], weights: number[] = [];
    for (const b of splitRows(blockRows, 3)) {
      const part = centerBlockRowsPass({ raster: img.raster, mask: null }, { blockPx: f }, { rowStart: b.rowStart * f, rowEnd: Math.min(800, b.rowEnd * f) });
      sums.push(...part.sum);
      weights.push(...part.weight);
    }
    expect(sums).toEqual(Array.from(whole.sum));
    expect(weights).toEqual(Array.from(whole.weight));
    expect(whole.weight[0]).toBe(f * f);
  });
});

