/**
 * Preferred orientation (texture) of a film as a modulation of each ring's intensity
 * with azimuth, of mean 1 so the ring's azimuthal mean (its radial profile) is unchanged:
 *
 *   'cosine': T(phi) = 1 + A cos(2 (phi - phi_0)),                       0 <= A <= 1,
 *             maxima 1 + A at phi_0 and phi_0 + 180 degrees, minima 1 - A between;
 *   'arcs':   T(phi) = (1 - A) + A a(phi) / mean(a),                       0 <= A <= 1,
 *             a(phi) = sum over k of exp(-4 ln 2 (phi - phi_0 - k pi)^2 / w^2)
 *             (two opposite arcs of FWHM w, each wrapped over neighbouring turns),
 *             so a fraction A of the ring's intensity sits in the two arcs.
 *
 * Azimuths are corrected-frame azimuths (pattern-frame.ts), degrees from +x toward +y.
 * Mean 1 holds exactly for 'cosine' and, once tabulated, by normalisation for 'arcs'.
 */

export interface TextureSpec {
  shape: 'cosine' | 'arcs';
  /** A, 0 to 1. */
  amplitude: number;
  /** phi_0: azimuth of the maxima, degrees from +x toward +y. */
  azimuthDeg: number;
  /** For 'arcs': FWHM of each arc, degrees, > 0 and <= 180 (default 30). */
  arcFwhmDeg?: number;
}

export const DEFAULT_ARC_FWHM_DEG = 30;

/** Throws a RangeError naming the bad field. */
export function checkTexture(texture: TextureSpec, label = 'texture.'): void {
  if (texture.shape !== 'cosine' && texture.shape !== 'arcs') {
    throw new RangeError(`${label}shape must be 'cosine' or 'arcs'; got ${JSON.stringify(texture.shape)}`);
  }
  if (!(texture.amplitude >= 0 && texture.amplitude <= 1)) throw new RangeError(`${label}amplitude must lie in [0, 1]; got ${texture.amplitude}`);
  if (!Number.isFinite(texture.azimuthDeg)) throw new RangeError(`${label}azimuthDeg must be finite; got ${texture.azimuthDeg}`);
  if (texture.arcFwhmDeg !== undefined && !(texture.arcFwhmDeg > 0 && texture.arcFwhmDeg <= 180)) {
    throw new RangeError(`${label}arcFwhmDeg must lie in (0, 180] degrees; got ${texture.arcFwhmDeg}`);
  }
}

/**
 * T(phi) at azimuth `azimuthRad`: exact for 'cosine'; for 'arcs' with a(phi) divided by
 * its analytic mean over a turn, 2 * w sqrt(pi / (4 ln 2)) / (2 pi) (two arcs per turn,
 * each a Gaussian of area w sqrt(pi / (4 ln 2))). The wrapped sum runs over the seven
 * nearest arc positions; the next lies 3.5 pi away, where even a 180-degree arc is below 1e-14.
 */
export function textureFactor(texture: TextureSpec, azimuthRad: number): number {
  const phi0 = (texture.azimuthDeg * Math.PI) / 180;
  if (texture.shape === 'cosine') return 1 + texture.amplitude * Math.cos(2 * (azimuthRad - phi0));
  const w = ((texture.arcFwhmDeg ?? DEFAULT_ARC_FWHM_DEG) * Math.PI) / 180;
  // Offset from the nearest arc position phi_0 + k pi, in [-pi/2, pi/2).
  let offset = azimuthRad - phi0;
  offset -= Math.PI * Math.floor(offset / Math.PI + 0.5);
  let a = 0;
  for (let k = -3; k <= 3; k++) {
    const d = (offset - k * Math.PI) / w;
    a += Math.exp(-4 * Math.LN2 * d * d);
  }
  const mean = (2 * w * Math.sqrt(Math.PI / (4 * Math.LN2))) / (2 * Math.PI);
  return 1 - texture.amplitude + (texture.amplitude * a) / mean;
}
