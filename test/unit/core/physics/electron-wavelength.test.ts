import { describe, expect, it } from 'vitest';
import { ELECTRON_REST_ENERGY_EV, electronBeam, electronWavelengthA } from '../../../../core/physics';

describe('electronWavelengthA', () => {
  it('reduces to the non-relativistic h / sqrt(2 m e V) at 1 V to 1e-6', () => {
    // Non-relativistic form: 12.2643 Å / sqrt(V) (h / sqrt(2 m e) with CODATA 2018).
    const h = 6.62607015e-34, m = 9.1093837015e-31, e = 1.602176634e-19;
    const classical = h / Math.sqrt(2 * m * e * 1) / 1e-10;
    expect(electronWavelengthA(1) / classical - 1).toBeLessThan(1e-6);
  });

  it('falls with voltage', () => {
    expect(electronWavelengthA(300e3)).toBeLessThan(electronWavelengthA(200e3));
  });

  it('throws for zero, negative and non-finite voltages, naming voltageV', () => {
    for (const v of [0, -200e3, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => electronWavelengthA(v)).toThrow(/voltageV/);
    }
  });
});

describe('electronBeam', () => {
  it('gives gamma = 1 + eV/mc^2, beta from gamma, and 1/lambda', () => {
    const b = electronBeam(200e3);
    expect(b.gamma).toBeCloseTo(1 + 200e3 / ELECTRON_REST_ENERGY_EV, 14);
    expect(b.betaVOverC).toBeCloseTo(Math.sqrt(1 - 1 / b.gamma ** 2), 14);
    expect(b.ewaldRadiusPerA * b.wavelengthA).toBeCloseTo(1, 14);
    expect(b.wavelengthPm).toBeCloseTo(b.wavelengthA * 100, 12);
  });

  it('is consistent with relativistic momentum: lambda = h / (gamma m v)', () => {
    const b = electronBeam(300e3);
    const h = 6.62607015e-34, m = 9.1093837015e-31, c = 299792458;
    const lambdaFromMomentum = h / (b.gamma * m * b.betaVOverC * c) / 1e-10;
    expect(b.wavelengthA / lambdaFromMomentum - 1).toBeLessThan(1e-12);
  });
});
