/**
 * The camera's uncertainty budget: the reference term of a standard and the root sum of
 * squares of relative standard uncertainties (GUM, JCGM 100:2008, eq. 10 in relative form).
 * Check values: the module's documented defaults worked by hand (1e-3 Å as the half-width
 * of a rectangular distribution, u = 1e-3 / sqrt 3, GUM 4.3.7; alpha 15e-6 /K x 20 K;
 * 2e-4 for the film: from memory, as the module says), and a Monte Carlo propagation of
 * the same inputs through the exact flat-detector geometry (JCGM 101:2008, the
 * supplement's method, which does not use the linear law the budget relies on).
 */
import { describe, expect, it } from 'vitest';
import {
  cameraUncertaintyBudget,
  cameraWithBudget,
  DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE,
  standardReferenceUncertainty,
} from '../../../../core/calibration';
import { electronWavelengthA } from '../../../../core/physics';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

describe('standardReferenceUncertainty', () => {
  it('combines the library value, the temperature under the beam and thin-film effects for gold (a = 4.0786 Å, the library value)', () => {
    const u = standardReferenceUncertainty({ id: 'Au', aA: 4.0786 });
    // 1e-3 Å / sqrt 3 / 4.0786 Å = 1.41553e-4 (hand calculation).
    expect(u.valueRelative).toBeCloseTo(1.41553e-4, 8);
    expect(u.valueSource).toBe('library default');
    expect(u.thermalRelative).toBeCloseTo(3.0e-4, 12); // 15e-6 /K x 20 K
    expect(u.filmRelative).toBe(2e-4);
    // sqrt(1.41553^2 + 3^2 + 2^2) x 1e-4 = 3.87346e-4.
    expect(u.relative).toBeCloseTo(3.87346e-4, 8);
  });

  it('uses a stated uncertainty as given: a certificate or CIF value 4.0782(3) Å gives 0.0003 / 4.0782 = 7.356e-5', () => {
    const u = standardReferenceUncertainty({ id: 'Au', aA: 4.0782 }, 0.0003);
    expect(u.valueSource).toBe('stated');
    expect(u.valueRelative).toBeCloseTo(7.356e-5, 8);
    expect(u.relative).toBeCloseTo(Math.sqrt(7.356e-5 ** 2 + 3e-4 ** 2 + 2e-4 ** 2), 8);
  });

  it('refuses a lattice constant that is not positive and a negative stated uncertainty', () => {
    expect(() => standardReferenceUncertainty({ id: 'X', aA: 0 })).toThrow(/standard\.aA must be a positive lattice constant/);
    expect(() => standardReferenceUncertainty({ id: 'X', aA: 4 }, -1e-4)).toThrow(/statedSigmaA must be a standard uncertainty >= 0/);
  });
});

describe('cameraUncertaintyBudget', () => {
  const gold = standardReferenceUncertainty({ id: 'Au', aA: 4.0786 });

  it('is the root sum of squares of the fit, the reference and the transfer term (default 0.1 %, from memory)', () => {
    const b = cameraUncertaintyBudget(2e-6, gold, { relative: DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE, source: 'default' });
    expect(DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE).toBe(1e-3);
    expect(b.totalRelative).toBeCloseTo(Math.sqrt(2e-6 ** 2 + 3.87346e-4 ** 2 + 1e-3 ** 2), 8);
    // 1.0724e-3: the transfer term dominates, the fit is negligible.
    expect(b.totalRelative).toBeCloseTo(1.0724e-3, 6);
    expect(b.totalRelative / 2e-6).toBeGreaterThan(100);
    expect(Object.keys(b).slice(0, 4)).toEqual(['fitRelative', 'referenceRelative', 'reproducibilityRelative', 'totalRelative']);
  });

  it('an internal standard (same image) has no transfer term but keeps the reference term', () => {
    const b = cameraUncertaintyBudget(5e-5, gold, { relative: 0, source: 'same image' });
    expect(b.reproducibilityRelative).toBe(0);
    expect(b.totalRelative).toBeCloseTo(Math.hypot(5e-5, gold.relative), 12);
    expect(() => cameraUncertaintyBudget(5e-5, gold, { relative: 1e-3, source: 'same image' })).toThrow(/no transfer term/);
    expect(() => cameraUncertaintyBudget(-1, gold, { relative: 0, source: 'given' })).toThrow(/fitRelative must be/);
  });

  it('cameraWithBudget sets the camera sigma to the total, leaving the camera length', () => {
    const b = cameraUncertaintyBudget(1e-5, gold, { relative: 3e-3, source: 'given' });
    const cam = cameraWithBudget({ voltageV: 200e3, cameraLengthPx: 28571.4, cameraLengthSigmaPx: 0.3, source: 'test', calibrated: true }, b);
    expect(cam.cameraLengthPx).toBe(28571.4);
    expect(cam.cameraLengthSigmaPx).toBeCloseTo(b.totalRelative * 28571.4, 9);
  });

  it('agrees with a Monte Carlo propagation (JCGM 101) of the three inputs through the exact geometry to a later ring (seed 4411)', () => {
    // Calibrate on gold 111 at 200 kV, L/p = 28571 px; apply the camera to a TiN 200 ring (d = 2.1209 Å) in a later image.
    const lambda = electronWavelengthA(200e3);
    const lpTrue = 28571.4;
    const radius = (d: number, lp: number): number => lp * Math.tan(2 * Math.asin(lambda / (2 * d)));
    const dOf = (r: number, lp: number): number => lambda / (2 * Math.sin(Math.atan(r / lp) / 2));
    const aUsed = 4.0786; // the library value the calibration assumes
    const rUnknown = (lp: number): number => radius(2.1209, lp);
    const fit = 4e-5;
    const repro = 2e-3;
    const b = cameraUncertaintyBudget(fit, gold, { relative: repro, source: 'given' });
    const rand = mulberry32(4411);
    const n = 40000;
    let sum = 0;
    let sum2 = 0;
    for (let k = 0; k < n; k++) {
      const aTrue = aUsed * (1 + gold.relative * gaussian(rand)); // the standard's real lattice constant on the microscope
      const r111 = radius(aTrue / Math.sqrt(3), lpTrue) * (1 + fit * gaussian(rand)); // measured, with the fit's scatter
      const lpFitted = r111 / Math.tan(2 * Math.asin(lambda / (2 * (aUsed / Math.sqrt(3)))));
      const lpLater = lpTrue * (1 + repro * gaussian(rand)); // the camera when the later image was taken
      const dReported = dOf(rUnknown(lpLater), lpFitted);
      sum += dReported;
      sum2 += dReported * dReported;
    }
    const mean = sum / n;
    const sd = Math.sqrt(sum2 / n - mean * mean);
    // Standard error of a standard deviation from 40000 draws: 1/sqrt(2n) = 0.35 %; allow 2 %.
    expect(Math.abs(sd / mean / b.totalRelative - 1)).toBeLessThan(0.02);
  });
});
