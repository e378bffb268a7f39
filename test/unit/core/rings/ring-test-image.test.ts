import { describe, expect, it } from 'vitest';
import { mulberry32 } from '../../../support/seeded-random';
import { makeRingImage, poisson } from './ring-test-image';

describe('poisson (test-image noise)', () => {
  it('has mean and variance lambda for lambda = 4 and 250 (seed 5, 40000 draws)', () => {
    for (const lambda of [4, 250]) {
      const rand = mulberry32(5);
      let s = 0, s2 = 0;
      const n = 40000;
      for (let k = 0; k < n; k++) { const v = poisson(rand, lambda); s += v; s2 += v * v; }
      const mean = s / n, variance = s2 / n - mean * mean;
      expect(Math.abs(mean - lambda)).toBeLessThan(5 * Math.sqrt(lambda / n));
      expect(Math.abs(variance / lambda - 1)).toBeLessThan(0.04);
    }
  });
});

describe('makeRingImage', () => {
  it('puts the ring crest at the requested corrected radius (noise-free)', () => {
    const img = makeRingImage({ width: 201, height: 201, frame: { centerXPx: 100, centerYPx: 100, axisRatio: 1, angleDeg: 0 }, rings: [{ radiusPx: 60, sigmaPx: 2, peakCounts: 1000 }], background: { levelCounts: 0, centralCounts: 0, decayPx: 1 }, seed: 1, noise: false });
    const row = img.raster.data.subarray(100 * 201, 101 * 201);
    expect(row[160]!).toBeGreaterThan(row[159]!);
    expect(row[160]!).toBeGreaterThan(row[161]!);
    // Pixel-integrated Gaussian: exp(-z^2/2) averaged over the pixel, about 0.99 of the peak at the crest.
    expect(row[160]! / 1000).toBeGreaterThan(0.97);
  });
});
