/**
 * The diffuse background of a ring pattern: electrons scattered inelastically
 * (plasmons, core losses) and thermal diffuse scattering, which fill the pattern with a
 * smooth glow falling away from the direct beam. Annula's model (its own, chosen to be
 * smooth, monotonic and to fall as a power of radius far out):
 *
 *   B(R) = floorCounts + levelCounts * g(R) / g(R_ref),   g(R) = (1 + (R / R_s)^2)^(-p / 2)
 *
 * with R the corrected radius (px), R_s the `scaleRadiusPx` inside which the glow
 * flattens, p the `exponent` of the fall far out (B - floor ~ R^-p for R >> R_s) and
 * R_ref the reference radius at which the diffuse part equals `levelCounts` (the
 * simulator takes the radius of the strongest ring, so `levelCounts` reads as "the
 * background under the strongest ring"). `floorCounts` is a uniform level (stray
 * electrons, a thin-film plateau). Counts are expected electrons per pixel.
 */

export interface DiffuseBackgroundSpec {
  /** Diffuse part at the reference radius, expected electrons per pixel, >= 0. */
  levelCounts: number;
  /** R_s, px, > 0: radius inside which the glow flattens. */
  scaleRadiusPx: number;
  /** p, >= 0: B - floor falls as R^-p far outside R_s. */
  exponent: number;
  /** Uniform floor, expected electrons per pixel, >= 0. */
  floorCounts: number;
}

/** Throws a RangeError naming the bad field (prefixed by `label`, e.g. "background."). */
export function checkDiffuseBackground(spec: DiffuseBackgroundSpec, label = 'background.'): void {
  const nonNegative = (value: number, name: string): void => {
    if (!(value >= 0) || !Number.isFinite(value)) throw new RangeError(`${label}${name} must be a finite number >= 0; got ${value}`);
  };
  nonNegative(spec.levelCounts, 'levelCounts');
  nonNegative(spec.exponent, 'exponent');
  nonNegative(spec.floorCounts, 'floorCounts');
  if (!(spec.scaleRadiusPx > 0) || !Number.isFinite(spec.scaleRadiusPx)) {
    throw new RangeError(`${label}scaleRadiusPx must be > 0 px; got ${spec.scaleRadiusPx}`);
  }
}

/**
 * B(R), expected electrons per pixel, at corrected radius `radiusPx` (>= 0), with the
 * diffuse part equal to levelCounts at `referenceRadiusPx` (>= 0).
 */
export function diffuseBackgroundCounts(spec: DiffuseBackgroundSpec, radiusPx: number, referenceRadiusPx: number): number {
  const g = (r: number): number => Math.pow(1 + (r / spec.scaleRadiusPx) ** 2, -spec.exponent / 2);
  return spec.floorCounts + (spec.levelCounts * g(radiusPx)) / g(referenceRadiusPx);
}
