/**
 * Predicted rings of a random polycrystal (kinematic theory).
 *
 * Every reflection family of a phase diffracts into a cone; families with the same d
 * (cubic (3 3 3) and (5 1 1), hexagonal (2 1 0) and (1 2 0) of Laue class 6/m) fall on
 * the same ring and are merged.
 *
 * Geometric factor. For a randomly oriented powder the integrated power of a whole
 * Debye ring is, up to constants common to all rings,
 *
 *   P_hkl ∝ m |F|^2 / sin(theta) x (polarisation factor)
 *
 * (the powder-method Lorentz factor of a complete ring: B. E. Warren, X-Ray
 * Diffraction, Addison-Wesley 1969, ch. 4 "The powder method", from memory; the same
 * kinematic result for electron diffraction of polycrystals in B. K. Vainshtein,
 * Structure Analysis by Electron Diffraction, Pergamon 1964, ch. 4, from memory).
 * Fast electrons scatter through small angles and are not polarised as X-rays are, so
 * there is no polarisation factor and sin(theta) = lambda / (2 d), giving
 *
 *   ringPower        = sum over the ring's families of m |F|^2 d          (arbitrary units)
 *
 * The ring's radius on the detector is R = L tan(2 theta) ≈ L lambda / d, so its
 * power spread round a circumference 2 pi R gives the azimuthally averaged profile
 * height (power per unit length of ring)
 *
 *   profileIntensity = sum of m |F|^2 d^2                                  (arbitrary units)
 *
 * and relativeIntensity = 100 profileIntensity / (largest profileIntensity of the set).
 * These are kinematic: dynamical scattering, texture and the absorption of thick
 * films change observed intensities, so compare orders of rings, not exact ratios.
 */

import type { Phase } from './phase';
import type { PredictedRing, ReflectionFamily } from './predicted-ring';
import { reflectionFamilies } from './reflection-families';

export interface PredictRingsOptions {
  /** Smallest d included, Å (>= 0.25 Å). */
  dMinA: number;
  /** Largest d included, Å; default: no limit. */
  dMaxA?: number;
  /** Families whose d differ by at most this fraction share a ring; default 1e-6. */
  mergeRelativeTolerance?: number;
  /** Keep absent families (and rings made only of them, with zero power); default false. */
  includeAbsent?: boolean;
}

/**
 * Groups families (sorted by d descending) into rings: a family joins the current ring
 * when its d is within `tolerance` (relative) of the ring's first, largest d.
 */
export function mergeFamiliesIntoRings(families: readonly ReflectionFamily[], tolerance: number): PredictedRing[] {
  const rings: PredictedRing[] = [];
  let current: ReflectionFamily[] = [];
  const flush = (): void => {
    if (current.length === 0) return;
    let multiplicity = 0;
    let ringPower = 0;
    let profileIntensity = 0;
    for (const f of current) {
      multiplicity += f.multiplicity;
      ringPower += f.multiplicity * f.fSquaredA2 * f.dA;
      profileIntensity += f.multiplicity * f.fSquaredA2 * f.dA * f.dA;
    }
    rings.push({ dA: current[0]!.dA, families: current, multiplicity, ringPower, profileIntensity, relativeIntensity: 0 });
    current = [];
  };
  for (const f of families) {
    if (current.length > 0 && current[0]!.dA - f.dA > tolerance * current[0]!.dA) flush();
    current.push(f);
  }
  flush();
  const maxProfile = rings.reduce((m, r) => Math.max(m, r.profileIntensity), 0);
  for (const r of rings) r.relativeIntensity = maxProfile > 0 ? 100 * (r.profileIntensity / maxProfile) : 0;
  return rings;
}

/**
 * The rings of `phase` with dMinA <= d <= dMaxA, sorted by d descending. A ring's dA is
 * the d of its first (largest-d) family; its families are sorted as reflectionFamilies
 * sorts them. relativeIntensity is 0 for every ring when all have zero power.
 *
 * @throws RangeError for a negative or non-finite mergeRelativeTolerance, and whatever
 *   reflectionFamilies throws (dMinA < 0.25 Å, dMaxA <= dMinA, a phase that cannot be prepared).
 */
export function predictRings(phase: Phase, options: PredictRingsOptions): PredictedRing[] {
  const tolerance = options.mergeRelativeTolerance ?? 1e-6;
  if (!(tolerance >= 0) || !Number.isFinite(tolerance)) {
    throw new RangeError(`mergeRelativeTolerance must be a finite number >= 0; got ${tolerance}`);
  }
  const families = reflectionFamilies(phase, {
    dMinA: options.dMinA,
    ...(options.dMaxA !== undefined ? { dMaxA: options.dMaxA } : {}),
    includeAbsent: options.includeAbsent ?? false,
  });
  return mergeFamiliesIntoRings(families, tolerance);
}
