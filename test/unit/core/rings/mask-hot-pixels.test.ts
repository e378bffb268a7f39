import { describe, expect, it } from 'vitest';
import { hotPixelCandidateRows, maskHotPixels } from '../../../../core/rings/mask-hot-pixels';
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

describe('hotPixelCandidateRows screens', () => {
  it('skip no pixel the rule itself would flag: against the rule applied to every pixel, k = 1.5 and 3 (seed 431)', () => {
    const img = makeRingImage({ width: 300, height: 260, frame: { centerXPx: 140.3, centerYPx: 120.8, axisRatio: 1.01, angleDeg: 20 }, rings: [{ radiusPx: 60, sigmaPx: 0.8, peakCounts: 900 }, { radiusPx: 100, sigmaPx: 1.2, peakCounts: 400 }], hotPixels: { count: 20, valueCounts: 2000 }, seed: 431 });
    const { width, height, data } = img.raster;
    const skip = new Uint8Array(width * height);
    for (let p = 0; p < skip.length; p += 37) skip[p] = 1;
    for (const k of [1.5, 3]) {
      const t = { k, readVariance: -2, varianceSlope: 1, floorVariance: 1 };
      const rule = (i: number, j: number): boolean => {
        const nb: number[] = [];
        for (let dj = -1; dj <= 1; dj++) for (let di = -1; di <= 1; di++) {
          const ii = i + di, jj = j + dj;
          if ((di === 0 && dj === 0) || ii < 0 || jj < 0 || ii >= width || jj >= height || skip[jj * width + ii]) continue;
          nb.push(data[jj * width + ii]!);
        }
        if (nb.length < 2) return false;
        nb.sort((a, b) => a - b);
        const n = nb.length;
        const ref = n >= 3 ? nb[n - 2]! : nb[n - 1]!;
        const mid = n % 2 ? nb[(n - 1) >> 1]! : 0.5 * (nb[n / 2 - 1]! + nb[n / 2]!);
        return data[j * width + i]! - ref > k * Math.sqrt(Math.max(t.readVariance + t.varianceSlope * ref, t.floorVariance)) + Math.max(0, ref - mid);
      };
      const expected: number[] = [];
      for (let j = 0; j < height; j++) for (let i = 0; i < width; i++) if (!skip[j * width + i] && rule(i, j)) expected.push(j * width + i);
      const got = Array.from(hotPixelCandidateRows(img.raster, { width, height, excluded: skip }, t, 0, height));
      expect(got).toEqual(expected);
      expect(expected.length).toBeGreaterThan(k < 2 ? 200 : 20);
    }
  });
});

