import { describe, expect, it } from 'vitest';
import { pseudoVoigt as pseudoVoigtPeakShape, pseudoVoigtHeight } from '../../../../core/rings/pseudo-voigt';
import {
  RING_EXTENT_FWHM,
  RING_TAPER_START_FWHM,
  ringLineShape,
  ringLineShapeArea,
  ringLineShapeValue,
} from '../../../../core/simulate';

/** The unit-area pseudo-Voigt the simulator uses (core/rings), written as a function of offset, FWHM and eta. */
const pseudoVoigt = (x: number, fwhmPx: number, eta: number): number => pseudoVoigtPeakShape({ area: 1, centerPx: 0, fwhmPx, eta }, x);
const pseudoVoigtPeak = (fwhmPx: number, eta: number): number => pseudoVoigtHeight({ area: 1, centerPx: 0, fwhmPx, eta });

/** Trapezoid integral of f over [a, b] in n steps. */
function integrate(f: (x: number) => number, a: number, b: number, n: number): number {
  const h = (b - a) / n;
  let s = 0.5 * (f(a) + f(b));
  for (let i = 1; i < n; i++) s += f(a + i * h);
  return s * h;
}

/** Where f (decreasing on [0, hi]) crosses level, by bisection. */
function crossing(f: (x: number) => number, level: number, hi: number): number {
  let lo = 0;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > level) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

describe('pseudoVoigt', () => {
  for (const eta of [0, 0.3, 0.5, 1]) {
    it(`pseudoVoigt(x, 2.5, ${eta}) has FWHM 2.5 and pseudoVoigtPeak(2.5, ${eta}) as its value at 0 (Thompson, Cox and Hastings 1987 mixing)`, () => {
      const f = (x: number): number => pseudoVoigt(x, 2.5, eta);
      expect(f(0)).toBeCloseTo(pseudoVoigtPeak(2.5, eta), 14);
      expect(2 * crossing(f, f(0) / 2, 10)).toBeCloseTo(2.5, 10);
    });
  }

  it('pseudoVoigt(x, 2, 0) has unit area, and pseudoVoigt(x, 2, 1) has area (2/pi) atan(4000) within ±2000 FWHM', () => {
    expect(integrate((x) => pseudoVoigt(x, 2, 0), -20, 20, 40_000)).toBeCloseTo(1, 10);
    expect(integrate((x) => pseudoVoigt(x, 2, 1), -4000, 4000, 4_000_000)).toBeCloseTo((2 / Math.PI) * Math.atan(4000), 7);
  });
});

describe('ringLineShape', () => {
  it(`ringLineShape(3, 0.5) is 1 at its centre, the exact scaled pseudo-Voigt to ${RING_TAPER_START_FWHM} FWHM and 0 from ${RING_EXTENT_FWHM} FWHM`, () => {
    const shape = ringLineShape(3, 0.5);
    expect(ringLineShapeValue(shape, 0)).toBe(1);
    for (const x of [0.7, -1.5, 4, 29.9]) expect(ringLineShapeValue(shape, x)).toBeCloseTo(pseudoVoigt(x, 3, 0.5) / pseudoVoigtPeak(3, 0.5), 14);
    expect(ringLineShapeValue(shape, 60)).toBe(0);
    expect(ringLineShapeValue(shape, -75)).toBe(0);
    expect(shape.extentPx).toBe(60);
  });

  it('ringLineShape(3, 1) rolls off smoothly: continuous value and slope at both ends of the roll-off', () => {
    const shape = ringLineShape(3, 1);
    const f = (x: number): number => ringLineShapeValue(shape, x);
    const h = 1e-5;
    for (const edge of [30, 60]) {
      expect(Math.abs(f(edge - h) - f(edge + h))).toBeLessThan(1e-8);
      const slopeIn = (f(edge - h) - f(edge - 2 * h)) / h;
      const slopeOut = (f(edge + 2 * h) - f(edge + h)) / h;
      expect(Math.abs(slopeIn - slopeOut)).toBeLessThan(1e-5);
    }
  });

  it('ringLineShapeArea of a Gaussian ring (eta 0) is FWHM sqrt(pi / ln 2) / 2 = 1.0645 FWHM (Gaussian integral)', () => {
    const area = ringLineShapeArea(ringLineShape(2, 0), 500);
    expect(area.areaPx).toBeCloseTo((2 * Math.sqrt(Math.PI / Math.LN2)) / 2, 9);
    expect(area.areaTimesCircumferencePx2).toBeCloseTo(2 * Math.PI * 500 * area.areaPx, 6);
  });

  it('ringLineShapeArea of a Lorentzian ring lies between its untapered areas to 10 and to 20 FWHM (arctangent)', () => {
    const shape = ringLineShape(2, 1);
    const untapered = (k: number): number => (2 * Math.atan(2 * k)) / Math.PI / pseudoVoigtPeak(2, 1);
    const a = ringLineShapeArea(shape, 400).areaPx;
    expect(a).toBeGreaterThan(untapered(10));
    expect(a).toBeLessThan(untapered(20));
    expect(a).toBeCloseTo(integrate((x) => ringLineShapeValue(shape, x), -40, 40, 400_000), 8);
  });

  it('ringLineShapeArea keeps only radii >= 0 for a ring whose extent reaches the centre', () => {
    const shape = ringLineShape(2, 0.5);
    const a = ringLineShapeArea(shape, 10);
    expect(a.areaPx).toBeCloseTo(integrate((x) => ringLineShapeValue(shape, x - 10), 0, 50, 200_000), 8);
  });

  it('ringLineShape refuses a width <= 0 and an eta outside [0, 1]', () => {
    expect(() => ringLineShape(0, 0.5)).toThrow(/fwhmPx must be > 0 px; got 0/);
    expect(() => ringLineShape(2, 1.2)).toThrow(/eta must lie in \[0, 1\]/);
  });
});
