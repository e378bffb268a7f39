/**
 * Isotropic displacement parameters as phase readers receive them: B or U, or
 * anisotropic U^ij turned into an equivalent isotropic value.
 *
 *   B = 8 pi^2 U,   U = <u^2> the mean-square displacement along any direction, Å^2
 *   (K. N. Trueblood et al., "Atomic displacement parameter nomenclature",
 *   Acta Cryst. A52 (1996) 770-781).
 */

import { reciprocalMetricTensor, metricTensor, type UnitCell } from './unit-cell';

/**
 * B used for a site whose source gives no displacement parameter, Å^2. A value
 * of about 0.5 Å^2 is typical of inorganic solids and metals at room
 * temperature (common practice); it changes relative ring intensities only
 * slightly at the d-spacings of a ring pattern, and never their positions.
 */
export const DEFAULT_B_ISO_A2 = 0.5;

/** B = 8 pi^2 U (Trueblood et al. 1996), Å^2 from Å^2. */
export function bIsoFromUIsoA2(uIsoA2: number): number {
  return 8 * Math.PI * Math.PI * uIsoA2;
}

/** U = B / (8 pi^2), Å^2 from Å^2. */
export function uIsoFromBIsoA2(bIsoA2: number): number {
  return bIsoA2 / (8 * Math.PI * Math.PI);
}

/** Anisotropic U^ij in the CIF convention (_atom_site_aniso_U_11 ... _U_23), Å^2. */
export interface AnisotropicU {
  u11: number;
  u22: number;
  u33: number;
  u12: number;
  u13: number;
  u23: number;
}

/**
 * Equivalent isotropic U of an anisotropic U^ij, one third of the trace of the
 * orthogonalised tensor:
 *
 *   U_eq = (1/3) sum_i sum_j U^ij a*_i a*_j (a_i . a_j)
 *
 * (R. X. Fischer and E. Tillmanns, Acta Cryst. C44 (1988) 775-776, eq. 4; the
 * form CIF's _atom_site_U_iso_or_equiv asks for). a*_i are the reciprocal cell
 * lengths and a_i . a_j the elements of the direct metric tensor.
 *
 * @returns U_eq in Å^2 (not checked for positive definiteness of U^ij)
 */
export function uEquivalentA2(u: AnisotropicU, cell: UnitCell): number {
  const g = metricTensor(cell);
  const gs = reciprocalMetricTensor(cell);
  const ar = [Math.sqrt(gs[0]), Math.sqrt(gs[4]), Math.sqrt(gs[8])];
  const uij = [u.u11, u.u12, u.u13, u.u12, u.u22, u.u23, u.u13, u.u23, u.u33];
  let sum = 0;
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) sum += uij[3 * i + j]! * ar[i]! * ar[j]! * g[3 * i + j]!;
  }
  return sum / 3;
}
