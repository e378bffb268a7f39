/**
 * The electron wavelength against outside sources:
 * 1. a handbook table (D. B. Williams and C. B. Carter, Transmission Electron
 *    Microscopy, 2nd ed., Springer 2009, Table 1.2: relativistic wavelengths, in nm,
 *    to three significant figures) -- values quoted from memory;
 * 2. the same formula evaluated with mathjs's physical constants (CODATA 2018 in mathjs);
 * 3. scipy.constants (CODATA 2018) from Debian's python3-scipy, to 1e-9 relative.
 */
import { describe, expect, it } from 'vitest';
import * as math from 'mathjs';
import { electronBeam, electronWavelengthA } from '../../core/physics';
import { referenceAvailable, runPythonJson } from './python-reference';

// Williams & Carter Table 1.2, relativistic lambda in nm (from memory); 80 kV from the same
// authors' discussion of low-voltage work, 0.00418 nm (from memory).
const HANDBOOK_LAMBDA_NM: Array<[kV: number, nm: number]> = [
  [80, 0.00418],
  [100, 0.0037],
  [120, 0.00335],
  [200, 0.00251],
  [300, 0.00197],
  [400, 0.00164],
  [1000, 0.00087],
];

// Same table: speed in units of c and mass in units of m0 (from memory).
const HANDBOOK_BETA_GAMMA: Array<[kV: number, beta: number, gamma: number]> = [
  [100, 0.548, 1.196],
  [200, 0.695, 1.391],
  [300, 0.777, 1.587],
  [400, 0.828, 1.783],
  [1000, 0.941, 2.957],
];

describe('electron wavelength against a handbook table (Williams & Carter Table 1.2, from memory)', () => {
  for (const [kV, nm] of HANDBOOK_LAMBDA_NM) {
    it(`${kV} kV gives ${nm} nm to the table's last digit`, () => {
      const lambdaNm = electronWavelengthA(kV * 1e3) / 10;
      expect(Math.abs(lambdaNm - nm)).toBeLessThanOrEqual(0.000005 + 1e-12);
    });
  }
  for (const [kV, beta, gamma] of HANDBOOK_BETA_GAMMA) {
    it(`${kV} kV gives v/c = ${beta} and m/m0 = ${gamma} to the table's last digit`, () => {
      const b = electronBeam(kV * 1e3);
      expect(Math.abs(b.betaVOverC - beta)).toBeLessThanOrEqual(0.0005 + 1e-12);
      expect(Math.abs(b.gamma - gamma)).toBeLessThanOrEqual(0.0005 + 1e-12);
    });
  }
});

describe('electron wavelength against mathjs physical constants', () => {
  it('agrees to 1e-12 relative at 80-1000 kV, evaluated with units', () => {
    const h = math.planckConstant;
    const m = math.electronMass;
    const e = math.elementaryCharge;
    const c = math.speedOfLight;
    for (const kV of [80, 100, 120, 200, 300, 400, 1000]) {
      const V = math.unit(kV, 'kV');
      const eV = math.multiply(e, V) as math.Unit;
      const mc2 = math.multiply(m, math.multiply(c, c)) as math.Unit;
      const factor = 1 + (math.divide(eV, math.multiply(2, mc2)) as unknown as number);
      const p = math.sqrt(math.multiply(math.multiply(2, math.multiply(m, eV)), factor) as math.Unit) as unknown as math.Unit;
      const lambda = math.divide(h, p) as math.Unit;
      const lambdaA = lambda.toNumber('angstrom');
      expect(Math.abs(electronWavelengthA(kV * 1e3) / lambdaA - 1)).toBeLessThan(1e-12);
    }
  });
});

describe.runIf(referenceAvailable('scipy'))('electron wavelength against scipy.constants (python3-scipy)', () => {
  it('agrees to 1e-9 relative for lambda, gamma and v/c at 80-1000 kV', () => {
    const volts = [80e3, 100e3, 120e3, 200e3, 300e3, 400e3, 1e6];
    const ref = runPythonJson<Array<{ lambdaA: number; gamma: number; beta: number; codata: string }>>(
      `
from scipy import constants as k
out = []
for V in INPUT:
    E = k.e * V
    mc2 = k.m_e * k.c**2
    p = (2 * k.m_e * E * (1 + E / (2 * mc2))) ** 0.5
    g = 1 + E / mc2
    out.append({"lambdaA": k.h / p * 1e10, "gamma": g, "beta": (1 - 1/g**2) ** 0.5,
                "codata": str(k.physical_constants["electron mass"])})
print(json.dumps(out))
`,
      volts,
    );
    volts.forEach((v, i) => {
      const b = electronBeam(v);
      expect(Math.abs(b.wavelengthA / ref[i]!.lambdaA - 1)).toBeLessThan(1e-9);
      expect(Math.abs(b.gamma / ref[i]!.gamma - 1)).toBeLessThan(1e-9);
      expect(Math.abs(b.betaVOverC / ref[i]!.beta - 1)).toBeLessThan(1e-9);
    });
    // scipy 1.10 carries CODATA 2018: m_e = 9.1093837015e-31 kg.
    expect(ref[0]!.codata).toContain('9.1093837015e-31');
  });
});
