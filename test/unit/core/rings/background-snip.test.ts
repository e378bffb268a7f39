import { describe, expect, it } from 'vitest';
import { llsForward, llsInverse, snipBackground } from '../../../../core/rings/background-snip';
import { gaussian, mulberry32 } from '../../../support/seeded-random';
import { unitPseudoVoigt } from './analytic-ring-image';

/** A profile at 0.5 px bins: decaying diffuse background, a broad halo (FWHM 60 px) and sharp rings (FWHM 3 px). */
function ringProfile(eta = 0.2) {
  const w = 0.5;
  const r = Float64Array.from({ length: 800 }, (_, k) => 5 + (k + 0.5) * w);
  const baseline = r.map((x) => 400 * Math.exp(-x / 90) + 40 + 150 * Math.exp(-4 * Math.LN2 * ((x - 180) / 60) ** 2));
  const rings = [
    { radiusPx: 80.2, area: 2000 },
    { radiusPx: 140.7, area: 1200 },
    { radiusPx: 201.3, area: 900 }, // on the halo's flank
    { radiusPx: 290.1, area: 600 },
  ];
  const peaks = r.map((x) => rings.reduce((s, ring) => s + ring.area * unitPseudoVoigt(x - ring.radiusPx, 3, eta), 0));
  const height = (ring: { area: number }) => ring.area * unitPseudoVoigt(0, 3, eta);
  return { w, r, baseline, peaks, rings, height, y: baseline.map((b, k) => b + peaks[k]!) };
}

describe('snipBackground', () => {
  it('clips by the definition: v_i <- min(v_i, (v_{i-p} + v_{i+p}) / 2) for p = 1..m, from the previous pass', () => {
    // Worked by hand: pass p = 1 on [1, 5, 2, 8, 3] gives [1, 1.5, 2, 2.5, 3].
    expect(Array.from(snipBackground([1, 5, 2, 8, 3], { windowBins: 1, transform: 'none' }))).toEqual([1, 1.5, 2, 2.5, 3]);
    // p = 2 then shrinks to what the ends allow: bin 2 becomes min(2, (1 + 3) / 2).
    expect(Array.from(snipBackground([1, 5, 2, 8, 3], { windowBins: 2, transform: 'none' }))).toEqual([1, 1.5, 2, 2.5, 3]);
    expect(Array.from(snipBackground([0, 0, 10, 0, 0], { windowBins: 1, transform: 'none' }))).toEqual([0, 0, 0, 0, 0]);
  });

  it('leaves a straight line unchanged without the transform', () => {
    const line = Array.from({ length: 50 }, (_, k) => 3 + 0.7 * k);
    const bg = snipBackground(line, { windowBins: 10, transform: 'none' });
    line.forEach((v, k) => expect(bg[k]).toBeCloseTo(v, 10));
  });

  it('does not bite into sharp rings: under each ring the known baseline within 1 % of the ring height (Gaussian rings, fourth order, m = 4 FWHM)', () => {
    const { w, baseline, y, rings, height } = ringProfile(0);
    const bg = snipBackground(y, { windowBins: Math.round((4 * 3) / w), filterOrder: 4 });
    for (const ring of rings) {
      const k = Math.round((ring.radiusPx - 5) / w - 0.5);
      expect(Math.abs(bg[k]! - baseline[k]!)).toBeLessThan(0.01 * height(ring));
    }
  });

  it('keeps little of the Lorentzian tails of pseudo-Voigt rings in the background: within 2 % of the ring height under each ring (eta = 0.2)', () => {
    const { w, baseline, y, rings, height } = ringProfile(0.2);
    const bg = snipBackground(y, { windowBins: Math.round((4 * 3) / w), filterOrder: 4 });
    for (const ring of rings) {
      const k = Math.round((ring.radiusPx - 5) / w - 0.5);
      expect(bg[k]! - baseline[k]!).toBeLessThan(0.02 * height(ring));
      expect(bg[k]! - baseline[k]!).toBeGreaterThan(-0.01 * height(ring));
    }
  });

  it('leaves a broad halo in the background: its top within 1 %, and the baseline within 1 % everywhere 4 FWHM from the rings', () => {
    const { w, r, baseline, y, rings } = ringProfile(0.2);
    const bg = snipBackground(y, { windowBins: Math.round((4 * 3) / w), filterOrder: 4 });
    const top = Math.round((180 - 5) / w - 0.5);
    expect(Math.abs(bg[top]! / baseline[top]! - 1)).toBeLessThan(0.01);
    for (let k = 0; k < r.length; k++) {
      if (rings.some((ring) => Math.abs(r[k]! - ring.radiusPx) < 12)) continue;
      expect(Math.abs(bg[k]! / baseline[k]! - 1)).toBeLessThan(0.01);
    }
  });

  it('clips a curved background cumulatively with the second-order filter (about m^3 |v\'\'| / 6), and not with the fourth', () => {
    const { w, y, baseline } = ringProfile(0.2);
    const top = Math.round((180 - 5) / w - 0.5);
    const loss = (m: number, filterOrder: 2 | 4) => 1 - snipBackground(y, { windowBins: m, filterOrder })[top]! / baseline[top]!;
    // Halo of 150 counts, sigma 25.5 px: v'' = -0.058 per bin^2; m = 24 bins predicts 24^3 * 0.058 / 6 = 134 counts, capped by the halo itself.
    expect(loss(9, 2)).toBeGreaterThan(0.02);
    expect(loss(24, 2)).toBeGreaterThan(0.2);
    expect(Math.abs(loss(24, 4))).toBeLessThan(0.01);
  });

  it('gives back the Gaussian rings: the net area of each within 3 % of its true area', () => {
    const { w, r, y, rings } = ringProfile(0);
    const bg = snipBackground(y, { windowBins: Math.round((4 * 3) / w), filterOrder: 4 });
    for (const ring of rings) {
      let area = 0;
      for (let k = 0; k < r.length; k++) if (Math.abs(r[k]! - ring.radiusPx) < 6) area += (y[k]! - bg[k]!) * w;
      expect(Math.abs(area / ring.area - 1)).toBeLessThan(0.03);
    }
  });

  it('follows the baseline through noise, pulled down by less than 1.5 sigma of the bin noise (seed 12)', () => {
    const { w, baseline, y } = ringProfile();
    const rand = mulberry32(12);
    const sigma = 2; // per-bin standard error of a well-populated profile
    const noisy = y.map((v) => v + sigma * gaussian(rand));
    const bg = snipBackground(noisy, { windowBins: Math.round((4 * 3) / w), filterOrder: 4 });
    let mean = 0;
    let count = 0;
    for (let k = 100; k < 700; k++) {
      mean += bg[k]! - baseline[k]!;
      count++;
    }
    // Clipping takes the lower of noisy neighbours' averages at each pass, so the baseline sits below the
    // mean by a smooth offset of order sigma, which the fits' local line takes up.
    mean /= count;
    expect(mean).toBeLessThan(-0.2 * sigma);
    expect(mean).toBeGreaterThan(-1.5 * sigma);
  });

  it('bridges empty bins and returns a background there too', () => {
    const y = [10, 10, Number.NaN, Number.NaN, 10, 30, 10, 10];
    const bg = snipBackground(y, { windowBins: 2, transform: 'none' });
    expect(Array.from(bg)).toEqual([10, 10, 10, 10, 10, 10, 10, 10]);
    expect(Array.from(snipBackground([Number.NaN, Number.NaN], { windowBins: 1 })).every(Number.isNaN)).toBe(true);
  });

  it('shifts negative values up by their minimum for the LLS transform and back after', () => {
    const y = Array.from({ length: 40 }, (_, k) => (k === 0 ? 0 : 20 + 10 * Math.sin(k / 3) + (k === 20 ? 50 : 0)));
    const direct = snipBackground(y, { windowBins: 5 });
    const shifted = snipBackground(y.map((v) => v - 50), { windowBins: 5 });
    direct.forEach((v, k) => expect(shifted[k]).toBeCloseTo(v - 50, 9));
  });

  it('refuses a window that is not an integer >= 1, and an unknown filter order', () => {
    expect(() => snipBackground([1, 2, 3], { windowBins: 0 })).toThrow(/windowBins must be an integer >= 1; got 0/);
    expect(() => snipBackground([1, 2, 3], { windowBins: 2.5 })).toThrow(/windowBins/);
    expect(() => snipBackground([1, 2, 3], { windowBins: 1, filterOrder: 3 as 2 })).toThrow(/filterOrder must be 2 or 4/);
  });

  it('with the fourth-order filter leaves a cubic unchanged (transform none)', () => {
    const cubic = Array.from({ length: 60 }, (_, k) => 50 - 0.02 * (k - 30) ** 2 + 0.0004 * (k - 30) ** 3);
    const bg = snipBackground(cubic, { windowBins: 10, transform: 'none', filterOrder: 4 });
    cubic.forEach((v, k) => expect(bg[k]).toBeCloseTo(v, 9));
  });
});

describe('llsForward / llsInverse', () => {
  it('are inverse to each other over counts from 0 to 1e6', () => {
    for (const y of [0, 0.3, 1, 17, 1234, 1e6]) expect(llsInverse(llsForward(y))).toBeCloseTo(y, 6);
    expect(llsForward(0)).toBeCloseTo(Math.log(Math.log(2) + 1), 15);
  });
});
