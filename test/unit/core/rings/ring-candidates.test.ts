import { describe, expect, it } from 'vitest';
import { findRingCandidates } from '../../../../core/rings/ring-candidates';
import { makeRingImage } from './ring-test-image';

const FRAME = { centerXPx: 300.3, centerYPx: 290.6, axisRatio: 1.015, angleDeg: 40 };

describe('findRingCandidates', () => {
  it('finds every ring of a test image at its radius and width in the true frame, and nothing else (seed 71)', () => {
    const rings = [{ radiusPx: 80, sigmaPx: 1.5, peakCounts: 200 }, { radiusPx: 150, sigmaPx: 2, peakCounts: 60 }, { radiusPx: 175, sigmaPx: 2, peakCounts: 90 }, { radiusPx: 260, sigmaPx: 3, peakCounts: 40 }];
    const img = makeRingImage({ width: 600, height: 600, frame: FRAME, rings, background: { levelCounts: 20, centralCounts: 500, decayPx: 120 }, seed: 71 });
    const found = findRingCandidates(img.raster, undefined, FRAME);
    expect(found.rings).toHaveLength(4);
    found.rings.forEach((r, k) => {
      expect(Math.abs(r.radiusPx - rings[k]!.radiusPx)).toBeLessThan(0.3);
      // The Gaussian sigma, widened by the pixel (variance + 1/12) and the 1 px bins.
      expect(Math.abs(r.sigmaPx - Math.sqrt(rings[k]!.sigmaPx ** 2 + 1 / 6))).toBeLessThan(0.35);
    });
  });

  it('says so when there is no ring (seed 72)', () => {
    const img = makeRingImage({ width: 300, height: 300, frame: FRAME, rings: [], background: { levelCounts: 20, centralCounts: 500, decayPx: 120 }, seed: 72 });
    const found = findRingCandidates(img.raster, undefined, { ...FRAME, centerXPx: 150, centerYPx: 150 });
    expect(found.rings).toHaveLength(0);
    expect(found.reason).toMatch(/no ring stands 6 noise units above the baseline/);
    expect(found.profile.mean.length).toBeGreaterThan(100);
  });

  it('refuses bad options', () => {
    const r = { width: 10, height: 10, data: new Float32Array(100) };
    expect(() => findRingCandidates(r, undefined, FRAME, { maxRings: 0 })).toThrow(/maxRings must be a positive integer/);
    expect(() => findRingCandidates(r, undefined, { ...FRAME, axisRatio: 0.9 })).toThrow(/axisRatio/);
  });
});
