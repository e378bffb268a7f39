import { describe, expect, it } from 'vitest';
import { checkSeed, deriveSeed, randomStream } from '../../../../core/simulate';
import { mulberry32 } from '../../../support/seeded-random';

describe('randomStream', () => {
  it('randomStream(20240611).uniform() gives the Mulberry32 sequence of test/support (same algorithm, written separately)', () => {
    const ours = randomStream(20240611);
    const support = mulberry32(20240611);
    for (let i = 0; i < 1000; i++) expect(ours.uniform()).toBe(support());
  });

  it('the same seed repeats the stream and another seed does not', () => {
    const a = randomStream(7);
    const b = randomStream(7);
    const c = randomStream(8);
    const xs = Array.from({ length: 50 }, () => a.uniform());
    expect(Array.from({ length: 50 }, () => b.uniform())).toEqual(xs);
    expect(Array.from({ length: 50 }, () => c.uniform())).not.toEqual(xs);
  });

  it('uniform() over 200000 draws (seed 11) has mean 1/2 and variance 1/12 within 5 standard errors', () => {
    const r = randomStream(11);
    const n = 200_000;
    let s = 0;
    let s2 = 0;
    let outside = 0;
    for (let i = 0; i < n; i++) {
      const u = r.uniform();
      if (!(u >= 0 && u < 1)) outside++;
      s += u;
      s2 += u * u;
    }
    expect(outside).toBe(0);
    const mean = s / n;
    const variance = s2 / n - mean * mean;
    // Standard error of the mean sqrt(1/12 / n); of the variance sqrt((1/80 - 1/144) / n) (uniform moments).
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n));
    expect(Math.abs(variance - 1 / 12)).toBeLessThan(5 * Math.sqrt((1 / 80 - 1 / 144) / n));
  });

  it('normal() over 200000 draws (seed 12) has mean 0, variance 1, zero skewness and kurtosis 3 within 5 standard errors', () => {
    const r = randomStream(12);
    const n = 200_000;
    const m = [0, 0, 0, 0];
    for (let i = 0; i < n; i++) {
      const z = r.normal();
      m[0] += z;
      m[1] += z * z;
      m[2] += z * z * z;
      m[3] += z * z * z * z;
    }
    const [m1, m2, m3, m4] = m.map((v) => v / n) as [number, number, number, number];
    // Standard errors for a standard normal: mean 1/sqrt(n), second moment sqrt(2/n), third sqrt(15/n), fourth sqrt(96/n).
    expect(Math.abs(m1)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(m2 - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
    expect(Math.abs(m3)).toBeLessThan(5 * Math.sqrt(15 / n));
    expect(Math.abs(m4 - 3)).toBeLessThan(5 * Math.sqrt(96 / n));
  });

  it('deriveSeed(seed, ...labels) is repeatable and gives distinct streams for distinct labels', () => {
    expect(deriveSeed(5, 3, 0, 1)).toBe(deriveSeed(5, 3, 0, 1));
    const seeds = new Set<number>();
    for (let a = 0; a < 20; a++) for (let b = 0; b < 20; b++) seeds.add(deriveSeed(5, 3, a, b));
    expect(seeds.size).toBe(400);
    expect(deriveSeed(5, 1)).not.toBe(deriveSeed(6, 1));
    for (const s of seeds) expect(Number.isInteger(s) && s >= 0 && s <= 0xffffffff).toBe(true);
  });

  it('checkSeed and randomStream refuse seeds that are not integers in [0, 2^32)', () => {
    for (const bad of [-1, 1.5, 2 ** 32, Number.NaN]) expect(() => randomStream(bad)).toThrow(/seed must be an integer from 0 to 4294967295/);
    expect(() => checkSeed(2 ** 32 - 1)).not.toThrow();
  });
});
