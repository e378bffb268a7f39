import { describe, expect, it } from 'vitest';
import { MIN_BAND_PIXELS, runRowBands, splitRows, type RowBand, type RowBandRunner } from '../../../../core/rings/row-bands';
import { hotPixelCandidateRows } from '../../../../core/rings/mask-hot-pixels';
import { maskHotPixels } from '../../../../core/rings/mask-hot-pixels';
import { ROW_BAND_PASSES } from '../../../../core/rings/row-band-passes';
import { makeRingImage } from './ring-test-image';

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
