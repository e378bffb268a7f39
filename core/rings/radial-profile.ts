/**
 * The azimuthally averaged intensity against corrected radius, in bins of
 * equal width starting at rMinPx. Bin k covers [rMinPx + k w, rMinPx + (k+1) w)
 * and radiusPx[k] is its centre.
 */
export interface RadialProfile {
  rMinPx: number;
  binWidthPx: number;
  /** Bin centres, px. */
  radiusPx: Float64Array;
  /** Mean intensity per unit detector area (counts per pixel), NaN where no unmasked pixel falls. */
  mean: Float64Array;
  /** Summed intensity (pixel values times the fraction of each pixel in the bin). */
  sum: Float64Array;
  /** Unmasked pixel area in the bin, in pixels (fractional with sub-pixel splitting). */
  area: Float64Array;
  /** Standard error of the mean, from the scatter of pixel values in the bin (or Poisson: see stdErrSource). */
  stdErr: Float64Array;
  /**
   * Effective number of independent pixels in the bin, (sum f)^2 / sum f^2 over the
   * pixel fractions f (>= area when pixels are split; equal without splitting), when known.
   */
  effectiveCount?: Float64Array;
  /** Sub-pixels per pixel side used by the integration (1: whole pixels), when known. */
  subdivision?: number;
  /** Where stdErr comes from: the scatter of pixel values in the bin, or Poisson counts; when known. */
  stdErrSource?: 'scatter' | 'poisson';
}
