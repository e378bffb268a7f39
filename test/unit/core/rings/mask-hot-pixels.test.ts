import { describe, expect, it } from 'vitest';
import { maskHotPixels } from '../../../../core/rings/mask-hot-pixels';
import { estimatePixelNoise, noiseSigmaAt } from '../../../../core/rings/detector-noise-model';
import { makeRingImage } from './ring-test-image';

const FRAME = { centerXPx: 200.3, centerYPx: 190.8, axisRatio: 1.01, angleDeg: 30 };

describe('estimatePixelNoise', () => {
  it('finds variance = level for Poisson counts (gain 1, no read noise; seed 41)', () => {
    const img = makeRingImage({ width: 400, height: 400, frame: FRAME, rings: [{ radiusPx: 120, sigmaPx: 6, peakCounts: 400 }], background: { levelCounts: 30, centralCounts: 600, decayPx: 150 }, seed: 41 });
    const noise = estimatePixelNoise(img.raster);
    expect(Math.abs(noise.varianceSlope - 1)).toBeLessThan(0.1);
    // Level 400 lies inside the range of the image (the corners sit near 120 counts).
    expect(Math.abs(noiseSigmaAt(noise, 400) / 20 - 1)).toBeLessThan(0.05);
  });
});

describe('maskHotPixels', () => {
  it('finds 60 single hot pixels and leaves the crest of a 1-px-wide bright ring alone (seed 42)', () => {
    const img = makeRingImage({
      width: 400, height: 400, frame: FRAME,
      rings: [{ radiusPx: 80, sigmaPx: 1, peakCounts: 3000 }, { radiusPx: 150, sigmaPx: 2.5, peakCounts: 800 }],
      background: { levelCounts: 20, centralCounts: 300, decayPx: 150 },
      hotPixels: { count: 60, valueCounts: 2000 }, seed: 42,
    });
    const hot = maskHotPixels(img.raster);
    const found = new Set<number>();
    hot.mask.excluded.forEach((v, p) => { if (v) found.add(p); });
    for (const p of img.hotPixelIndices) expect(found.has(p)).toBe(true);
    // Anything else flagged would be a real pixel (e.g. on the sharp ring's crest).
    expect(hot.hotCount).toBe(new Set(img.hotPixelIndices).size);
    expect(hot.k).toBe(6);
  });

  it('finds a pair and a row of three hot pixels (the re-test passes)', () => {
    const img = makeRingImage({ width: 120, height: 120, frame: { ...FRAME, centerXPx: 60, centerYPx: 60 }, rings: [], background: { levelCounts: 50, centralCounts: 0, decayPx: 1 }, seed: 43 });
    const d = img.raster.data;
    const w = 120;
    for (const p of [30 * w + 30, 30 * w + 31, 80 * w + 40, 80 * w + 41, 80 * w + 42]) d[p] = 900;
    const hot = maskHotPixels(img.raster);
    expect(hot.hotCount).toBe(5);
  });

  it('skips masked pixels and refuses k <= 0', () => {
    const img = makeRingImage({ width: 60, height: 60, frame: { ...FRAME, centerXPx: 30, centerYPx: 30 }, rings: [], background: { levelCounts: 50, centralCounts: 0, decayPx: 1 }, seed: 44 });
    img.raster.data[30 * 60 + 30] = 5000;
    const mask = { width: 60, height: 60, excluded: new Uint8Array(3600) };
    mask.excluded[30 * 60 + 30] = 1;
    expect(maskHotPixels(img.raster, mask).hotCount).toBe(0);
    expect(() => maskHotPixels(img.raster, undefined, { k: 0 })).toThrow(/k must be a positive number/);
  });

  it('returns a reason, not a throw, when nothing can be estimated', () => {
    const tiny = { width: 3, height: 3, data: new Float32Array(9) };
    expect(maskHotPixels(tiny)).toMatchObject({ hotCount: 0, reason: /too few unmasked pixels/ });
  });
});
