import { describe, expect, it } from 'vitest';
import { detectPeaks, RICKER_FWHM_PER_SCALE } from '../../../../core/rings/peak-detection';
import { gaussian, mulberry32 } from '../../../support/seeded-random';
import { unitPseudoVoigt } from './analytic-ring-image';

const w = 0.5;
const radius = Float64Array.from({ length: 1200 }, (_, k) => 10 + (k + 0.5) * w);

function netProfile(peaks: { r: number; fwhm: number; area: number; eta?: number }[], sigma: number, seed: number) {
  const rand = mulberry32(seed);
  const net = radius.map((r) => peaks.reduce((s, p) => s + p.area * unitPseudoVoigt(r - p.r, p.fwhm, p.eta ?? 0.2), 0) + sigma * gaussian(rand));
  return { net, stdErr: new Float64Array(radius.length).fill(sigma) };
}

describe('detectPeaks', () => {
  it('finds separated rings of different widths with positions within a quarter bin and widths within 15 % (seed 3)', () => {
    const peaks = [
      { r: 60.3, fwhm: 2.5, area: 60 },
      { r: 150.8, fwhm: 4, area: 60 },
      { r: 330.1, fwhm: 8, area: 120 },
      { r: 500.6, fwhm: 3, area: 25 },
    ];
    const { net, stdErr } = netProfile(peaks, 0.5, 3);
    const found = detectPeaks(radius, w, net, stdErr);
    expect(found.length).toBe(4);
    found.forEach((f, i) => {
      expect(Math.abs(f.radiusPx - peaks[i]!.r)).toBeLessThan(0.25 * 2 * w);
      expect(Math.abs(f.fwhmPx / peaks[i]!.fwhm - 1)).toBeLessThan(0.15);
      expect(f.significance).toBeGreaterThan(5);
    });
  });

  it('finds nothing in noise alone at 5 sigma (seed 4), and nothing in a profile of zeros', () => {
    const { net, stdErr } = netProfile([], 1, 4);
    expect(detectPeaks(radius, w, net, stdErr)).toEqual([]);
    expect(detectPeaks(radius, w, new Float64Array(radius.length), stdErr)).toEqual([]);
  });

  it('keeps a peak just above the threshold and drops one just below it (seed 5)', () => {
    // Matched-filter significance of a Gaussian of area A, FWHM F, on bins of width w with noise s:
    // z = A sqrt(w) / (s sqrt(2 sqrt(pi) sigma)) at best; the Ricker wavelet reaches about 0.83 of it (from the convolution).
    const strong = netProfile([{ r: 200.2, fwhm: 3, area: 6, eta: 0 }], 0.5, 5);
    const weak = netProfile([{ r: 200.2, fwhm: 3, area: 1.5, eta: 0 }], 0.5, 5);
    const s = detectPeaks(radius, w, strong.net, strong.stdErr);
    expect(s.length).toBe(1);
    expect(detectPeaks(radius, w, weak.net, weak.stdErr)).toEqual([]);
    // The significance scales with the threshold option.
    expect(detectPeaks(radius, w, strong.net, strong.stdErr, { thresholdSigma: s[0]!.significance * 1.5 })).toEqual([]);
  });

  it('resolves two rings 2.5 FWHM apart and reports one for two rings 0.3 FWHM apart (seed 6)', () => {
    const pair = netProfile([{ r: 200, fwhm: 3, area: 40 }, { r: 207.5, fwhm: 3, area: 30 }], 0.5, 6);
    const found = detectPeaks(radius, w, pair.net, pair.stdErr);
    expect(found.map((f) => Math.round(f.radiusPx))).toEqual([200, 208]);
    const blend = netProfile([{ r: 200, fwhm: 3, area: 40 }, { r: 200.9, fwhm: 3, area: 40 }], 0.5, 6);
    expect(detectPeaks(radius, w, blend.net, blend.stdErr).length).toBe(1);
  });

  it('does not split one strong broad ring on noise: one detection in each of 10 seeds (20-29)', () => {
    for (let seed = 20; seed < 30; seed++) {
      const { net, stdErr } = netProfile([{ r: 300.4, fwhm: 10, area: 600, eta: 0.3 }], 0.5, seed);
      const found = detectPeaks(radius, w, net, stdErr);
      expect(found.length).toBe(1);
      expect(Math.abs(found[0]!.radiusPx - 300.4)).toBeLessThan(0.5);
    }
  });

  it('leaves empty bins (NaN) out of the sums', () => {
    const { net, stdErr } = netProfile([{ r: 200.2, fwhm: 3, area: 40 }], 0.5, 7);
    for (let k = 300; k < 320; k++) {
      net[k] = Number.NaN;
      stdErr[k] = Number.NaN;
    }
    const found = detectPeaks(radius, w, net, stdErr);
    expect(found.length).toBe(1);
    expect(found[0]!.radiusPx).toBeCloseTo(200.2, 0);
  });

  it('refuses arrays of different lengths and options out of range', () => {
    expect(() => detectPeaks(radius, w, new Float64Array(3), new Float64Array(3))).toThrow(/same length/);
    expect(() => detectPeaks(radius, 0, radius, radius)).toThrow(/binWidthPx/);
    expect(() => detectPeaks(radius, w, radius, radius, { thresholdSigma: 0 })).toThrow(/thresholdSigma/);
    expect(() => detectPeaks(radius, w, radius, radius, { minFwhmPx: 5, maxFwhmPx: 2 })).toThrow(/minFwhmPx <= maxFwhmPx/);
    expect(() => detectPeaks(radius, w, radius, radius, { scaleRatio: 1 })).toThrow(/scaleRatio/);
  });

  it('matches a Gaussian of standard deviation sigma best at scale sqrt(5) sigma: FWHM = 1.053 s', () => {
    expect(RICKER_FWHM_PER_SCALE).toBeCloseTo((2 * Math.sqrt(2 * Math.LN2)) / Math.sqrt(5), 12);
    expect(RICKER_FWHM_PER_SCALE).toBeCloseTo(1.0531, 4);
  });
});
