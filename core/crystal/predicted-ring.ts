import type { Hkl } from './hkl';

/** One reflection family: a set of hkl equivalent under the Laue group. */
export interface ReflectionFamily {
  /** Representative indices (the conventional choice: the largest h >= k >= l >= 0 style form the generator picks). */
  hkl: Hkl;
  /** Number of symmetry-equivalent hkl (Laue-group multiplicity, Friedel pairs included). */
  multiplicity: number;
  /** Interplanar spacing, Å. */
  dA: number;
  /** |F_hkl|^2 with electron scattering factors, Å^2 (kinematic). */
  fSquaredA2: number;
}

/**
 * A ring of a random polycrystal: every reflection family with the same d
 * (within a tolerance), e.g. cubic (3 3 3) and (5 1 1).
 */
export interface PredictedRing {
  dA: number;
  families: ReflectionFamily[];
  /** Total multiplicity of the ring (sum over families). */
  multiplicity: number;
  /** Kinematic power of the whole ring, arbitrary units: sum of m |F|^2 d (small-angle powder Lorentz factor). */
  ringPower: number;
  /** Azimuthally averaged profile height, arbitrary units: sum of m |F|^2 d^2 (power per unit length of ring). */
  profileIntensity: number;
  /** profileIntensity scaled so that the strongest ring of the set is 100. */
  relativeIntensity: number;
}
