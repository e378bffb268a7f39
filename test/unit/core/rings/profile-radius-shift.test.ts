/**
 * Radius accuracy of profile + fit on noise-free analytic rings at many sub-pixel
 * offsets: what the pixel integral, the split and the bins do to a ring's radius.
 */
import { describe, expect, it } from 'vitest';
import { integrateRadialProfile } from '../../../../core/rings/azimuthal-integration';
import { prepareIntegrationGeometry } from '../../../../core/rings/integration-geometry';
import { fitPeaks } from '../../../../core/rings/peak-fit';
import { profileRadiusShiftPx } from '../../../../core/rings/profile-radius-shift';
import { renderAnalyticImage } from './analytic-ring-image';

const rings = [
  { radiusPx: 20.4, fwhmPx: 2.4, eta: 0, area: 3000 },
  { radiusPx: 36.8, fwhmPx: 2.8, eta: 0.4, area: 3000 },
  { radiusPx: 57.3, fwhmPx: 3, eta: 0.2, area: 3000 },
];

/** Fitted radius minus true radius of each ring, before correction, for a frame. */
function fittedErrors(frame: { centerXPx: number; centerYPx: number; axisRatio: number; angleDeg: number }, subdivision: number, binWidthPx: number): number[] {
  const img = renderAnalyticImage({ width: 136, height: 136, frame, rings, background: () => 80, supersample: 6 });
  const g = prepareIntegrationGeometry(136, 136, frame);
  // Poisson standard errors for counts per value 1: the weights a counting detector would give.
  const p = integrateRadialProfile(img, null, g, { subdivision, binWidthPx, rMinPx: 8, rMaxPx: 66, noise: { kind: 'poisson', countsPerValue: 1 } });
  const fits = fitPeaks(p.radiusPx, p.mean, p.stdErr, null, rings.map((r) => ({ radiusPx: r.radiusPx + 0.2, fwhmPx: r.fwhmPx * 1.2, height: 300 })));
  return fits.map((f, i) => f.radiusPx - rings[i]!.radiusPx);
}

describe('profileRadiusShiftPx', () => {
  it('is [(2 - 1/s^2)/24 + w^2/12] / R', () => {
    expect(profileRadiusShiftPx(30, 3, 0.5)).toBeCloseTo(((2 - 1 / 9) / 24 + 0.25 / 12) / 30, 15);
    expect(profileRadiusShiftPx(100, 1, 1)).toBeCloseTo((1 / 24 + 1 / 12) / 100, 15);
    expect(() => profileRadiusShiftPx(0, 3, 0.5)).toThrow(/radiusPx/);
    expect(() => profileRadiusShiftPx(10, 0, 0.5)).toThrow(/subdivision/);
    expect(() => profileRadiusShiftPx(10, 3, 0)).toThrow(/binWidthPx/);
  });

  it('predicts the inward displacement measured at 8 generic sub-pixel offsets and frames, leaving under 0.003 px (s = 3, w = 0.5 px)', () => {
    const corrected: number[][] = rings.map(() => []);
    for (let o = 1; o <= 8; o++) {
      const frame = { centerXPx: 68 + o * 0.137, centerYPx: 67.5 + o * 0.061, axisRatio: 1 + 0.004 * o, angleDeg: 20 * o };
      fittedErrors(frame, 3, 0.5).forEach((e, i) => corrected[i]!.push(e + profileRadiusShiftPx(rings[i]!.radiusPx, 3, 0.5)));
    }
    corrected.forEach((errs, i) => {
      const uncorrectedMean = errs.reduce((a, b) => a + b, 0) / errs.length - profileRadiusShiftPx(rings[i]!.radiusPx, 3, 0.5);
      // Uncorrected, every ring sits inside its true radius by about the predicted amount (0.005 px at R = 20 px).
      expect(uncorrectedMean).toBeLessThan(0);
      for (const e of errs) expect(Math.abs(e)).toBeLessThan(0.003);
    });
  });

  it('leaves aliasing of at most 0.015 px when the centre sits on a symmetric pixel position (68, 67.5), round frame', () => {
    const errs = fittedErrors({ centerXPx: 68, centerYPx: 67.5, axisRatio: 1, angleDeg: 0 }, 3, 0.5);
    errs.forEach((e, i) => expect(Math.abs(e + profileRadiusShiftPx(rings[i]!.radiusPx, 3, 0.5))).toBeLessThan(0.015));
    // Whole pixels (s = 1) alias worse there: pixel radii then take few distinct values.
    const whole = fittedErrors({ centerXPx: 68, centerYPx: 68, axisRatio: 1, angleDeg: 0 }, 1, 0.5);
    const split = fittedErrors({ centerXPx: 68, centerYPx: 68, axisRatio: 1, angleDeg: 0 }, 3, 0.5);
    const worst = (a: number[], s: number) => Math.max(...a.map((e, i) => Math.abs(e + profileRadiusShiftPx(rings[i]!.radiusPx, s, 0.5))));
    expect(worst(whole, 1)).toBeGreaterThan(worst(split, 3));
  });
});
