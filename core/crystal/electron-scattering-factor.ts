/**
 * Elastic electron scattering factors of neutral atoms (first Born approximation),
 * from the five-Gaussian fits of International Tables for Crystallography Vol. C,
 * Table 4.3.2.2 (L.-M. Peng, G. Ren, S. L. Dudarev and M. J. Whelan, Acta Cryst.
 * A52 (1996) 257-276):
 *
 *   f_e(s) = sum_{i=1..5} a_i exp(-b_i s^2),   s = sin(theta) / lambda  (1/Å),  f_e in Å.
 *
 * The fits hold over 0 <= s <= 2 Å^-1 (d >= 0.25 Å). Beyond that this module does not
 * extrapolate: it throws, so a caller asking for reflections finer than d = 0.25 Å
 * learns that the table does not cover them. These factors exclude the relativistic
 * mass factor gamma = m/m0 (multiply by it for the scattering of fast electrons; a
 * constant factor that leaves relative intensities unchanged).
 */

import { ELECTRON_SCATTERING_Z_MAX, PENG_1996_COEFFICIENTS } from './data/electron-scattering-factors';
import { atomicNumber } from './elements';

/** Upper end of the fit range of Table 4.3.2.2, Å^-1. */
export const ELECTRON_SCATTERING_S_MAX_PER_A = 2;

/** Coefficients a1..a5 (Å), b1..b5 (Å^2) for atomic number z. */
export function electronScatteringCoefficients(z: number): readonly number[] {
  if (!Number.isInteger(z) || z < 1 || z > ELECTRON_SCATTERING_Z_MAX) {
    throw new RangeError(`atomic number must be an integer from 1 to ${ELECTRON_SCATTERING_Z_MAX} (H to Cf); got ${z}`);
  }
  return PENG_1996_COEFFICIENTS[z - 1]!;
}

/** Resolves a symbol or atomic number to Z, with the errors of atomicNumber. */
function toZ(elementOrZ: string | number): number {
  return typeof elementOrZ === 'number' ? (electronScatteringCoefficients(elementOrZ), elementOrZ) : atomicNumber(elementOrZ);
}

/** f_e(s) from coefficients, without range checks (inner loops check once). */
export function evaluateElectronScatteringFactor(coefficients: readonly number[], sSquaredPerA2: number): number {
  let f = 0;
  for (let i = 0; i < 5; i++) f += coefficients[i]! * Math.exp(-coefficients[i + 5]! * sSquaredPerA2);
  return f;
}

/**
 * Electron scattering factor f_e(s) of a neutral atom, Å.
 *
 * @param elementOrZ element symbol (as atomicNumber reads it: "Au", "O2-") or Z in 1..98
 * @param sPerA s = sin(theta)/lambda = 1/(2d), in 1/Å, 0 <= s <= 2
 * @throws RangeError for an unknown element or Z outside 1..98, and for s outside [0, 2] Å^-1
 * @example electronScatteringFactorA('Au', 0) // 10.5714 (sum of the a_i)
 */
export function electronScatteringFactorA(elementOrZ: string | number, sPerA: number): number {
  const z = toZ(elementOrZ);
  if (!(sPerA >= 0 && sPerA <= ELECTRON_SCATTERING_S_MAX_PER_A)) {
    throw new RangeError(
      `sPerA must lie in [0, ${ELECTRON_SCATTERING_S_MAX_PER_A}] 1/Å, the fit range of the tabulated electron scattering factors (d >= 0.25 Å); got ${sPerA}`,
    );
  }
  return evaluateElectronScatteringFactor(PENG_1996_COEFFICIENTS[z - 1]!, sPerA * sPerA);
}
