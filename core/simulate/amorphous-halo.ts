/**
 * Broad halos of an amorphous support film (carbon, silicon nitride, an oxide skin):
 * diffuse rings at the nearest-neighbour distances of the glass. Each is modelled as a
 * Gaussian in the length of the scattering vector q = 1/d = 2 sin(theta) / lambda,
 *
 *   H(R) = peakCounts * exp(-4 ln 2 (q(R) - 1/d_h)^2 / Delta_q^2),
 *
 * where q(R) is the exact q at corrected radius R (reciprocalRadiusPerA: flat detector),
 * d_h the halo's spacing and Delta_q its FWHM in 1/Å. A Gaussian is a plain smooth
 * choice (common practice for a first model of an amorphous halo), not a structure model.
 */

import { reciprocalRadiusPerA, type CameraGeometry } from '../physics';

export interface AmorphousHaloSpec {
  /** Spacing at the halo's maximum, Å, > 0. */
  dA: number;
  /** Full width at half maximum in q = 1/d, 1/Å, > 0. */
  fwhmPerA: number;
  /** Height above the diffuse background, expected electrons per pixel, >= 0. */
  peakCounts: number;
}

/** Throws a RangeError naming the bad field (prefixed by `label`, e.g. "halos[0]."). */
export function checkAmorphousHalo(halo: AmorphousHaloSpec, label: string): void {
  if (!(halo.dA > 0) || !Number.isFinite(halo.dA)) throw new RangeError(`${label}dA must be > 0 Å; got ${halo.dA}`);
  if (!(halo.fwhmPerA > 0) || !Number.isFinite(halo.fwhmPerA)) throw new RangeError(`${label}fwhmPerA must be > 0 1/Å; got ${halo.fwhmPerA}`);
  if (!(halo.peakCounts >= 0) || !Number.isFinite(halo.peakCounts)) {
    throw new RangeError(`${label}peakCounts must be a finite number >= 0; got ${halo.peakCounts}`);
  }
}

/** H(R), expected electrons per pixel, at corrected radius `radiusPx` for the given camera. */
export function amorphousHaloCounts(halo: AmorphousHaloSpec, radiusPx: number, camera: CameraGeometry): number {
  const z = (reciprocalRadiusPerA(radiusPx, camera) - 1 / halo.dA) / halo.fwhmPerA;
  return halo.peakCounts * Math.exp(-4 * Math.LN2 * z * z);
}

/**
 * The two halos of an amorphous carbon support film, at d = 2.1 Å and 1.2 Å (from
 * memory: the familiar broad rings of holey-carbon grids), the second at half the height
 * of the first; widths 0.12 and 0.16 1/Å are illustrative, not measured values.
 * @param firstPeakCounts height of the 2.1 Å halo, expected electrons per pixel
 */
export function amorphousCarbonHalos(firstPeakCounts: number): AmorphousHaloSpec[] {
  return [
    { dA: 2.1, fwhmPerA: 0.12, peakCounts: firstPeakCounts },
    { dA: 1.2, fwhmPerA: 0.16, peakCounts: firstPeakCounts / 2 },
  ];
}
