/**
 * The unscattered beam: a bright Gaussian spot at the pattern centre,
 *
 *   D(R) = peakCounts * exp(-4 ln 2 R^2 / Gamma^2),
 *
 * in corrected radius R, FWHM Gamma. At the default 1e6 electrons per pixel it saturates
 * a 16-bit detector at any gain >= 0.066 ADU per electron wherever the beam stop leaves it
 * uncovered, as real exposures long enough to show weak rings do.
 */

export interface DirectBeamSpec {
  /** Height at the centre, expected electrons per pixel, >= 0. */
  peakCounts: number;
  /** Full width at half maximum, px, > 0. */
  fwhmPx: number;
}

/** Throws a RangeError naming the bad field. */
export function checkDirectBeam(beam: DirectBeamSpec, label = 'directBeam.'): void {
  if (!(beam.peakCounts >= 0) || !Number.isFinite(beam.peakCounts)) {
    throw new RangeError(`${label}peakCounts must be a finite number >= 0; got ${beam.peakCounts}`);
  }
  if (!(beam.fwhmPx > 0) || !Number.isFinite(beam.fwhmPx)) throw new RangeError(`${label}fwhmPx must be > 0 px; got ${beam.fwhmPx}`);
}

/** D(R), expected electrons per pixel, at corrected radius `radiusPx`. */
export function directBeamCounts(beam: DirectBeamSpec, radiusPx: number): number {
  const z = radiusPx / beam.fwhmPx;
  return beam.peakCounts * Math.exp(-4 * Math.LN2 * z * z);
}
