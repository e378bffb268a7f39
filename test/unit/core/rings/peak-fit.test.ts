import { describe, expect, it } from 'vitest';
import { fitPeaks } from '../../../../core/rings/peak-fit';
import { gaussian, mulberry32 } from '../../../support/seeded-random';
import { unitPseudoVoigt } from './analytic-ring-image';

const w = 0.25;
const radius = Float64Array.from({ length: 400 }, (_, k) => 40 + (k + 0.5) * w);

function profile(peaks: { r: number; fwhm: number; eta: number; area: number }[], sigma: number, rand: (() => number) | null, line = [5, 0.02]) {
  const values = radius.map((r) => line[0]! + line[1]! * (r - 90) + peaks.reduce((s, p) => s + p.area * unitPseudoVoigt(r - p.r, p.fwhm, p.eta), 0) + (rand ? sigma * gaussian(rand) : 0));
  return { values, stdErr: new Float64Array(radius.length).fill(sigma) };
}

describe('fitPeaks', () => {
  it('recovers a pseudo-Voigt on a sloping line exactly from noise-free data', () => {
    const { values, stdErr } = profile([{ r: 80.37, fwhm: 3.1, eta: 0.4, area: 50 }], 0.1, null);
    const [fit] = fitPeaks(radius, values, stdErr, null, [{ radiusPx: 80, fwhmPx: 4, height: 8 }]);
    expect(fit!.status).toBe('ok');
    expect(fit!.radiusPx).toBeCloseTo(80.37, 7);
    expect(fit!.fwhmPx).toBeCloseTo(3.1, 6);
    expect(fit!.eta).toBeCloseTo(0.4, 5);
    expect(fit!.area).toBeCloseTo(50, 4);
    expect(fit!.groupSize).toBe(1);
  });

  it('gives radius uncertainties whose spread over 300 seeded trials matches the absolute covariance (seed 21)', () => {
    const rand = mulberry32(21);
    const errors: number[] = [];
    let sigmaSum = 0;
    let birgeSum = 0;
    for (let t = 0; t < 300; t++) {
      const { values, stdErr } = profile([{ r: 80.37, fwhm: 3.1, eta: 0.4, area: 50 }], 0.5, rand);
      const [fit] = fitPeaks(radius, values, stdErr, null, [{ radiusPx: 80.2, fwhmPx: 3.5, height: 8 }]);
      expect(fit!.status).toBe('ok');
      errors.push(fit!.radiusPx - 80.37);
      sigmaSum += fit!.radiusSigmaAbsolutePx;
      birgeSum += fit!.birgeRatio;
    }
    const mean = errors.reduce((a, b) => a + b, 0) / errors.length;
    const sd = Math.sqrt(errors.reduce((a, b) => a + (b - mean) ** 2, 0) / (errors.length - 1));
    const predicted = sigmaSum / errors.length;
    // 300 trials fix the spread to about 4 %.
    expect(Math.abs(sd / predicted - 1)).toBeLessThan(0.12);
    expect(Math.abs(mean)).toBeLessThan((3 * sd) / Math.sqrt(errors.length));
    // Right weights: the Birge ratio stays close to 1 on average.
    expect(birgeSum / errors.length).toBeLessThan(1.1);
  });

  it('widens the uncertainty by the Birge ratio when the noise is twice the stated stdErr (seed 22)', () => {
    const rand = mulberry32(22);
    const { values } = profile([{ r: 80.37, fwhm: 3.1, eta: 0.4, area: 50 }], 1, rand);
    const stated = new Float64Array(radius.length).fill(0.5);
    const [fit] = fitPeaks(radius, values, stated, null, [{ radiusPx: 80.2, fwhmPx: 3.5, height: 8 }]);
    expect(fit!.birgeRatio).toBeGreaterThan(1.8);
    expect(fit!.birgeRatio).toBeLessThan(2.2);
    expect(fit!.radiusSigmaPx).toBeCloseTo(fit!.radiusSigmaAbsolutePx * fit!.birgeRatio, 12);
  });

  it('fits overlapping rings together: two rings 1.2 FWHM apart, each within 4 sigma (seed 23)', () => {
    const rand = mulberry32(23);
    const peaks = [{ r: 80.2, fwhm: 3, eta: 0.3, area: 40 }, { r: 83.8, fwhm: 3, eta: 0.3, area: 25 }];
    const { values, stdErr } = profile(peaks, 0.3, rand);
    const fits = fitPeaks(radius, values, stdErr, null, [{ radiusPx: 80, fwhmPx: 3, height: 6 }, { radiusPx: 84, fwhmPx: 3, height: 4 }]);
    fits.forEach((f, i) => {
      expect(f.status).toBe('ok');
      expect(f.groupSize).toBe(2);
      expect(Math.abs(f.radiusPx - peaks[i]!.r)).toBeLessThan(4 * f.radiusSigmaPx);
    });
    expect(fits[0]!.windowPx).toEqual(fits[1]!.windowPx);
  });

  it('subtracts a given baseline before the local line', () => {
    const baseline = radius.map((r) => 100 * Math.exp(-r / 50));
    const { values, stdErr } = profile([{ r: 90.6, fwhm: 2.6, eta: 0.2, area: 30 }], 0.1, null, [0, 0]);
    const withBase = values.map((v, k) => v + baseline[k]!);
    const [fit] = fitPeaks(radius, withBase, stdErr, baseline, [{ radiusPx: 90.5, fwhmPx: 3, height: 5 }]);
    expect(fit!.radiusPx).toBeCloseTo(90.6, 7);
  });

  it('fixes eta at 0 when the peak is sharper-shouldered than a Gaussian, and says so', () => {
    // A super-Gaussian exp(-z^4): flatter top and faster fall than a Gaussian, which pulls eta below 0.
    const values = radius.map((r) => 2 + 10 * Math.exp(-(((r - 75) / 2) ** 4)));
    const [fit] = fitPeaks(radius, values, new Float64Array(radius.length).fill(0.05), null, [{ radiusPx: 75, fwhmPx: 3.5, height: 10 }]);
    expect(fit!.status).toBe('ok');
    expect(fit!.eta).toBe(0);
    expect(fit!.reason).toMatch(/eta fixed at a bound/);
    expect(fit!.radiusPx).toBeCloseTo(75, 6);
  });

  it('reports a start on empty background as failed, with the reason (seed 24)', () => {
    const rand = mulberry32(24);
    const { values, stdErr } = profile([], 0.5, rand);
    const [fit] = fitPeaks(radius, values, stdErr, null, [{ radiusPx: 90, fwhmPx: 3, height: 2 }]);
    expect(fit!.status).toBe('failed');
    expect(fit!.reason).toMatch(/standard deviations|not positive|moved|converge|window/);
  });

  it('drops the second of two starts on one ring as a duplicate', () => {
    const { values, stdErr } = profile([{ r: 80.37, fwhm: 3.1, eta: 0.4, area: 50 }], 0.2, null);
    const fits = fitPeaks(radius, values, stdErr, null, [{ radiusPx: 80.1, fwhmPx: 3, height: 8 }, { radiusPx: 80.6, fwhmPx: 3, height: 8 }]);
    const ok = fits.filter((f) => f.status === 'ok');
    expect(ok.length).toBe(1);
    expect(ok[0]!.radiusPx).toBeCloseTo(80.37, 6);
    expect(fits.find((f) => f.status === 'failed')!.reason).toMatch(/merged into a neighbouring peak|cannot be told apart from a neighbouring peak/);
  });

  it('fails a window with too few usable bins, saying how many', () => {
    const { values, stdErr } = profile([{ r: 80.37, fwhm: 3.1, eta: 0.4, area: 50 }], 0.2, null);
    const sparse = stdErr.map((s, k) => (k % 20 === 0 ? s : Number.NaN));
    const [fit] = fitPeaks(radius, values, sparse, null, [{ radiusPx: 80.3, fwhmPx: 3, height: 8 }]);
    expect(fit!.status).toBe('failed');
    expect(fit!.reason).toMatch(/too few usable bins \(\d+\)/);
  });

  it('refuses arrays of different lengths and bad starts', () => {
    expect(() => fitPeaks(radius, new Float64Array(3), radius, null, [])).toThrow(/same length/);
    expect(() => fitPeaks(radius, radius, radius, null, [{ radiusPx: 80, fwhmPx: 0, height: 1 }])).toThrow(/starts\[0\]/);
    expect(() => fitPeaks(radius, radius, radius, null, [], { halfWindowFwhm: 0 })).toThrow(/halfWindowFwhm/);
  });
});
