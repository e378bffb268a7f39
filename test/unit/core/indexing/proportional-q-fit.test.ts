import { describe, expect, it } from 'vitest';
import { fitProportionalQ, lengthFromInverseSquare, qFromD } from '../../../../core/indexing';

describe('qFromD', () => {
  it('gives Q = 1/d^2 and sigma_Q = 2 sigma_d / d^3 (first-order propagation)', () => {
    const { qPerA2, qSigmaPerA2 } = qFromD(2, 0.01);
    expect(qPerA2).toBe(0.25);
    expect(qSigmaPerA2).toBeCloseTo(0.0025, 15);
    // Against a central difference of 1/d^2.
    const h = 1e-6;
    expect(qSigmaPerA2 / (0.01 * Math.abs((1 / (2 + h) ** 2 - 1 / (2 - h) ** 2) / (2 * h)))).toBeCloseTo(1, 8);
  });
});

describe('fitProportionalQ', () => {
  it('recovers x exactly from noise-free points and reports the propagated sigma', () => {
    const x = 1 / 4.0786 ** 2;
    const pts = [3, 4, 8, 11].map((n) => ({ qPerA2: n * x, qSigmaPerA2: 1e-3 * n * x, coefficient: n }));
    const fit = fitProportionalQ(pts);
    expect(fit.x / x - 1).toBeLessThan(1e-14);
    expect(fit.sigmaSource).toBe('propagated');
    const swcc = pts.reduce((s, p) => s + (p.coefficient / p.qSigmaPerA2) ** 2, 0);
    expect(fit.xSigma).toBeCloseTo(1 / Math.sqrt(swcc), 15);
  });
  it('switches to the chi-square-scaled sigma when the scatter exceeds the stated sigmas', () => {
    const pts = [
      { qPerA2: 1.1, qSigmaPerA2: 0.01, coefficient: 1 },
      { qPerA2: 1.9, qSigmaPerA2: 0.01, coefficient: 2 },
      { qPerA2: 3.2, qSigmaPerA2: 0.01, coefficient: 3 },
    ];
    const fit = fitProportionalQ(pts);
    expect(fit.reducedChiSquare!).toBeGreaterThan(1);
    expect(fit.sigmaSource).toBe('scaled by reduced chi-square');
    expect(fit.xSigma).toBeCloseTo(fit.xSigmaPropagated * Math.sqrt(fit.reducedChiSquare!), 15);
  });
  it('keeps the propagated sigma for a single point (no degrees of freedom)', () => {
    const fit = fitProportionalQ([{ qPerA2: 0.5, qSigmaPerA2: 0.001, coefficient: 2 }]);
    expect(fit.reducedChiSquare).toBeNull();
    expect(fit.xSigma).toBe(fit.xSigmaPropagated);
  });
  it('rejects an empty list, a zero sigma and all-zero coefficients', () => {
    expect(() => fitProportionalQ([])).toThrow(/at least one/);
    expect(() => fitProportionalQ([{ qPerA2: 1, qSigmaPerA2: 0, coefficient: 1 }])).toThrow(/points\[0\]\.qSigmaPerA2/);
    expect(() => fitProportionalQ([{ qPerA2: 1, qSigmaPerA2: 1, coefficient: 0 }])).toThrow(/undetermined/);
  });
});

describe('lengthFromInverseSquare', () => {
  it('gives L = x^-1/2 and sigma_L = L sigma_x / (2x)', () => {
    const { lengthA, lengthSigmaA } = lengthFromInverseSquare(0.0625, 0.0001);
    expect(lengthA).toBe(4);
    expect(lengthSigmaA).toBeCloseTo((4 * 0.0001) / 0.125, 15);
    expect(() => lengthFromInverseSquare(-1, 0)).toThrow(/positive/);
  });
});
