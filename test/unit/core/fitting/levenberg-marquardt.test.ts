import { describe, expect, it } from 'vitest';
import { choleskySolve, invertSymmetric, levenbergMarquardt, type LeastSquaresModel } from '../../../../core/fitting';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

/** y = A exp(-x / tau) + c with known sigma: a textbook nonlinear fit. */
function decayModel(x: Float64Array, y: Float64Array, sigma: number): LeastSquaresModel {
  return {
    observationCount: x.length,
    parameterCount: 3,
    evaluate(p, res, jac) {
      for (let i = 0; i < x.length; i++) {
        const e = Math.exp(-x[i]! / p[1]!);
        res[i] = (y[i]! - (p[0]! * e + p[2]!)) / sigma;
        if (jac) {
          jac[i * 3] = -e / sigma;
          jac[i * 3 + 1] = (-p[0]! * e * x[i]!) / (p[1]! * p[1]!) / sigma;
          jac[i * 3 + 2] = -1 / sigma;
        }
      }
    },
  };
}

describe('levenbergMarquardt', () => {
  it('recovers exact parameters from noise-free data', () => {
    const x = Float64Array.from({ length: 50 }, (_, i) => i * 0.2);
    const y = x.map((v) => 5 * Math.exp(-v / 1.7) + 0.3);
    const fit = levenbergMarquardt(decayModel(x, y, 1), [1, 1, 0]);
    expect(fit.converged).toBe(true);
    expect(fit.parameters[0]).toBeCloseTo(5, 8);
    expect(fit.parameters[1]).toBeCloseTo(1.7, 8);
    expect(fit.parameters[2]).toBeCloseTo(0.3, 8);
  });

  it('gives parameter errors whose spread over 400 seeded trials matches the covariance (seed 77)', () => {
    const rand = mulberry32(77);
    const x = Float64Array.from({ length: 60 }, (_, i) => i * 0.15);
    const sigma = 0.05;
    const taus: number[] = [];
    let predicted = 0;
    for (let t = 0; t < 400; t++) {
      const y = x.map((v) => 5 * Math.exp(-v / 1.7) + 0.3 + sigma * gaussian(rand));
      const fit = levenbergMarquardt(decayModel(x, y, sigma), [4, 1.5, 0]);
      taus.push(fit.parameters[1]!);
      predicted = Math.sqrt(fit.covariance![4]!);
    }
    const mean = taus.reduce((a, b) => a + b, 0) / taus.length;
    const sd = Math.sqrt(taus.reduce((a, b) => a + (b - mean) ** 2, 0) / (taus.length - 1));
    expect(Math.abs(sd / predicted - 1)).toBeLessThan(0.12);
    expect(Math.abs(mean - 1.7)).toBeLessThan(3 * sd / Math.sqrt(taus.length) + 1e-3);
  });

  it('refuses fewer observations than parameters', () => {
    const x = Float64Array.from([1, 2]);
    expect(() => levenbergMarquardt(decayModel(x, x, 1), [1, 1, 1])).toThrow(/at least as many observations/);
  });
});

describe('choleskySolve / invertSymmetric', () => {
  it('solve a 3x3 positive-definite system and invert it', () => {
    const a = Float64Array.from([4, 2, 0.6, 2, 5, 1, 0.6, 1, 3]);
    const b = Float64Array.from([1, 2, 3]);
    const x = Float64Array.from(b);
    expect(choleskySolve(Float64Array.from(a), x, 3)).toBe(true);
    for (let i = 0; i < 3; i++) {
      expect(a[i * 3]! * x[0]! + a[i * 3 + 1]! * x[1]! + a[i * 3 + 2]! * x[2]!).toBeCloseTo(b[i]!, 12);
    }
    const inv = invertSymmetric(a, 3)!;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let k = 0; k < 3; k++) s += a[i * 3 + k]! * inv[k * 3 + j]!;
      expect(s).toBeCloseTo(i === j ? 1 : 0, 12);
    }
  });
  it('reports a matrix that is not positive definite', () => {
    expect(choleskySolve(Float64Array.from([1, 2, 2, 1]), Float64Array.from([1, 1]), 2)).toBe(false);
  });
});
