import { describe, expect, it } from 'vitest';
import { fitPeaks } from '../../../../core/rings/peak-fit';
import { radiusPrecisionBoundPx } from '../../../../core/rings/radius-precision-bound';
import { mulberry32 } from '../../../support/seeded-random';
import { poissonDeviate, unitPseudoVoigt } from './analytic-ring-image';

describe('radiusPrecisionBoundPx', () => {
  it('is sigma_G / sqrt(N) for a Gaussian ring without background, R alone unknown (localisation limit; from memory)', () => {
    const fwhm = 3;
    const n = 1e5;
    const b = radiusPrecisionBoundPx({ radiusPx: 200, fwhmPx: fwhm, eta: 0, ringCounts: n, backgroundCountsPerPx: 0 }, { nuisance: 'none', halfWindowFwhm: 6, binWidthPx: 0.01 });
    const sigmaG = fwhm / (2 * Math.sqrt(2 * Math.LN2));
    expect(b / (sigmaG / Math.sqrt(n)) - 1).toBeLessThan(0.005);
    expect(b / (sigmaG / Math.sqrt(n)) - 1).toBeGreaterThan(-0.005);
  });

  it('is F / sqrt(2N) for a Lorentzian ring: Fisher information 1/(2 gamma^2) of a Cauchy location (from memory)', () => {
    const fwhm = 2;
    const n = 1e5;
    // A large radius makes the ring locally straight, so a window of +-200 FWHM keeps nearly all of the tails.
    const b = radiusPrecisionBoundPx({ radiusPx: 1e5, fwhmPx: fwhm, eta: 1, ringCounts: n, backgroundCountsPerPx: 0 }, { nuisance: 'none', halfWindowFwhm: 200, binWidthPx: 0.01 });
    expect(Math.abs(b / (fwhm / Math.sqrt(2 * n)) - 1)).toBeLessThan(0.01);
  });

  it('scales as 1/sqrt(counts), grows with background, and is no smaller with nuisance parameters', () => {
    const base = { radiusPx: 150, fwhmPx: 3, eta: 0.3, ringCounts: 4e5, backgroundCountsPerPx: 50 };
    const b1 = radiusPrecisionBoundPx(base);
    const b4 = radiusPrecisionBoundPx({ ...base, ringCounts: 16e5, backgroundCountsPerPx: 200 });
    expect(b4 / b1).toBeCloseTo(0.5, 6);
    expect(radiusPrecisionBoundPx({ ...base, backgroundCountsPerPx: 500 })).toBeGreaterThan(b1);
    expect(radiusPrecisionBoundPx(base, { nuisance: 'none' })).toBeLessThanOrEqual(b1);
    expect(radiusPrecisionBoundPx({ ...base, readNoiseVarianceCounts2: 100 })).toBeGreaterThan(b1);
    // Half the circumference: half the counts spread over half the area.
    expect(radiusPrecisionBoundPx({ ...base, ringCounts: 2e5, visibleFraction: 0.5 }) / b1).toBeCloseTo(Math.SQRT2, 6);
  });

  it('is reached by the peak fit on Poisson bins of the same model: Monte Carlo spread within 10 % of it (seed 61)', () => {
    // Expected counts per annular bin of width w: 2 pi r w (b + A pV(r)), A = N / (2 pi R).
    const model = { radiusPx: 120.3, fwhmPx: 3.2, eta: 0.3, ringCounts: 2e5, backgroundCountsPerPx: 40 };
    const w = 0.25;
    const k = 3;
    const r = Float64Array.from({ length: Math.round((2 * k * model.fwhmPx + 8) / w) }, (_, i) => model.radiusPx - k * model.fwhmPx - 4 + (i + 0.5) * w);
    const amp = model.ringCounts / (2 * Math.PI * model.radiusPx);
    const mu = r.map((x) => 2 * Math.PI * x * w * (model.backgroundCountsPerPx + amp * unitPseudoVoigt(x - model.radiusPx, model.fwhmPx, model.eta)));
    const area = r.map((x) => 2 * Math.PI * x * w);
    const rand = mulberry32(61);
    const errors: number[] = [];
    for (let t = 0; t < 400; t++) {
      const counts = mu.map((m) => poissonDeviate(m, rand));
      const mean = counts.map((c, i) => c / area[i]!);
      // Weights from the expected counts (the model's variance), as the bound assumes.
      const stdErr = mu.map((m, i) => Math.sqrt(m) / area[i]!);
      const [fit] = fitPeaks(r, mean, stdErr, null, [{ radiusPx: 120.3, fwhmPx: 3.2, height: 80 }], { halfWindowFwhm: k });
      if (fit!.status === 'ok') errors.push(fit!.radiusPx - model.radiusPx);
    }
    expect(errors.length).toBe(400);
    const m = errors.reduce((a, b) => a + b, 0) / errors.length;
    const sd = Math.sqrt(errors.reduce((a, b) => a + (b - m) ** 2, 0) / (errors.length - 1));
    const bound = radiusPrecisionBoundPx(model, { binWidthPx: w, halfWindowFwhm: k });
    // 400 trials fix the spread to 3.5 %; an efficient estimator sits at the bound, none below it.
    expect(sd / bound).toBeGreaterThan(0.9);
    expect(sd / bound).toBeLessThan(1.1);
  });

  it('refuses parameters out of range, naming them', () => {
    const base = { radiusPx: 150, fwhmPx: 3, eta: 0.3, ringCounts: 4e5, backgroundCountsPerPx: 50 };
    expect(() => radiusPrecisionBoundPx({ ...base, radiusPx: 0 })).toThrow(/radiusPx must be positive/);
    expect(() => radiusPrecisionBoundPx({ ...base, eta: 1.2 })).toThrow(/eta must be in \[0, 1\]/);
    expect(() => radiusPrecisionBoundPx({ ...base, ringCounts: -1 })).toThrow(/ringCounts/);
    expect(() => radiusPrecisionBoundPx({ ...base, backgroundCountsPerPx: -1 })).toThrow(/backgroundCountsPerPx/);
    expect(() => radiusPrecisionBoundPx({ ...base, visibleFraction: 0 })).toThrow(/visibleFraction/);
    expect(() => radiusPrecisionBoundPx(base, { binWidthPx: 0 })).toThrow(/binWidthPx/);
  });
});
