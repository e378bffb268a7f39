import { describe, expect, it } from 'vitest';
import { logFactorial, poissonDeviate, POISSON_PTRS_MIN_MEAN, randomStream, type RandomStream } from '../../../../core/simulate';

/** A stream that counts its uniforms. */
function counting(seed: number): RandomStream & { count: number } {
  const inner = randomStream(seed);
  const s = { count: 0, uniform: () => (s.count++, inner.uniform()), normal: () => inner.normal() };
  return s;
}

describe('poissonDeviate', () => {
  // Poisson law: mean = variance = mu; the sample variance of n draws has standard error
  // sqrt((mu + 2 mu^2) / n) (fourth central moment mu + 3 mu^2).
  for (const [mean, seed] of [[0.3, 1], [2, 2], [9.99, 3], [10, 4], [37.5, 5], [1000, 6], [1e6, 7]] as const) {
    it(`poissonDeviate(${mean}) over 100000 draws (seed ${seed}) has mean and variance ${mean} within 5 standard errors`, () => {
      const r = randomStream(seed);
      const n = 100_000;
      let s = 0;
      let s2 = 0;
      let bad = 0;
      for (let i = 0; i < n; i++) {
        const k = poissonDeviate(mean, r);
        if (!(Number.isInteger(k) && k >= 0)) bad++;
        s += k;
        s2 += k * k;
      }
      expect(bad).toBe(0);
      const m = s / n;
      const v = s2 / n - m * m;
      expect(Math.abs(m - mean)).toBeLessThan(5 * Math.sqrt(mean / n));
      expect(Math.abs(v - mean)).toBeLessThan(5 * Math.sqrt((mean + 2 * mean * mean) / n));
    });
  }

  for (const [mean, seed] of [[3.2, 21], [25, 22]] as const) {
    it(`poissonDeviate(${mean}) frequencies over 200000 draws (seed ${seed}) pass a chi-square test against the Poisson law at the 0.1% level`, () => {
      const r = randomStream(seed);
      const n = 200_000;
      const counts = new Map<number, number>();
      for (let i = 0; i < n; i++) {
        const k = poissonDeviate(mean, r);
        counts.set(k, (counts.get(k) ?? 0) + 1);
      }
      // Cells with expected count >= 20 (common practice), the tails pooled into the end cells.
      const pmf = (k: number): number => Math.exp(-mean + k * Math.log(mean) - logFactorial(k));
      let lo = 0;
      while (n * pmf(lo) < 20) lo++;
      let hi = lo;
      while (n * pmf(hi + 1) >= 20) hi++;
      let chi2 = 0;
      let cells = 0;
      let cdfBelow = 0;
      for (let k = 0; k < lo; k++) cdfBelow += pmf(k);
      let observedBelow = 0;
      let observedAbove = 0;
      for (const [k, c] of counts) {
        if (k < lo) observedBelow += c;
        if (k > hi) observedAbove += c;
      }
      let cdfInside = 0;
      for (let k = lo; k <= hi; k++) {
        const e = n * pmf(k);
        cdfInside += pmf(k);
        chi2 += ((counts.get(k) ?? 0) - e) ** 2 / e;
        cells++;
      }
      for (const [o, p] of [[observedBelow, cdfBelow], [observedAbove, 1 - cdfBelow - cdfInside]] as const) {
        if (n * p >= 5) {
          chi2 += (o - n * p) ** 2 / (n * p);
          cells++;
        }
      }
      // 99.9% point of chi-square with nu degrees of freedom by the Wilson-Hilferty approximation
      // (z = 3.090; E. B. Wilson and M. M. Hilferty, PNAS 17 (1931) 684, from memory).
      const nu = cells - 1;
      const limit = nu * (1 - 2 / (9 * nu) + 3.09 * Math.sqrt(2 / (9 * nu))) ** 3;
      console.log(`Poisson(${mean}): chi-square ${chi2.toFixed(1)} on ${nu} degrees of freedom (99.9% point ${limit.toFixed(1)})`);
      expect(chi2).toBeLessThan(limit);
    });
  }

  it(`uses inversion below mean ${POISSON_PTRS_MIN_MEAN} (one uniform per deviate) and PTRS from there on (seed 31)`, () => {
    const low = counting(31);
    for (let i = 0; i < 10_000; i++) poissonDeviate(9.5, low);
    expect(low.count).toBe(10_000);
    for (const mean of [10, 1000, 1e6]) {
      const high = counting(31);
      for (let i = 0; i < 10_000; i++) poissonDeviate(mean, high);
      const pairs = high.count / 2 / 10_000;
      console.log(`PTRS at mean ${mean}: ${pairs.toFixed(3)} pairs of uniforms per deviate`);
      expect(high.count % 2).toBe(0);
      expect(pairs).toBeGreaterThanOrEqual(1);
      expect(pairs).toBeLessThan(mean === 10 ? 1.4 : 1.2);
    }
  });

  it('poissonDeviate(0) is 0 and a negative, NaN or infinite mean is refused', () => {
    const r = randomStream(1);
    expect(poissonDeviate(0, r)).toBe(0);
    for (const bad of [-1, Number.NaN, Infinity]) expect(() => poissonDeviate(bad, r)).toThrow(/Poisson mean must be finite and >= 0/);
  });
});

describe('logFactorial', () => {
  it('logFactorial(k) equals the sum of ln j for j <= k to 1e-13 relative, across the table edge at 256', () => {
    let exact = 0;
    for (let k = 1; k <= 2000; k++) {
      exact += Math.log(k);
      expect(Math.abs(logFactorial(k) - exact)).toBeLessThan(1e-13 * Math.max(1, exact));
    }
    expect(logFactorial(0)).toBe(0);
  });
});
