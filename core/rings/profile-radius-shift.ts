/**
 * How far inward the radial profile of azimuthal-integration.ts shows a ring,
 * to second order in the sampling kernels over the ring's radius:
 *
 *   delta(R) = [(2 - 1/s^2) / 24 + w^2 / 12] / R      (px; the ring appears at R - delta)
 *
 * Three kernels, each small against R, each displacing a curved ring inward:
 *  - the pixel integral: a pixel value is the image averaged over a unit square,
 *    a blur of variance V = 1/12 per axis, and blurring a radial function g(r)
 *    in the plane gives g + (V/2)(g'' + g'/r) ~ g(r + V/(2r)) (the Laplacian in
 *    polar form), so the pixel image peaks V/(2R) = 1/(24 R) inside the ring;
 *  - the split: the value reaching radius r comes from pixel centres offset by
 *    the sub-pixel offsets, of variance (1 - 1/s^2)/12 per axis, which blurs
 *    the profile the same way: (1 - 1/s^2)/(24 R);
 *  - the bin: a bin averages over an annulus, whose area centroid lies
 *    w^2 / (12 r) outside its centre radius.
 * The unit tests measure it on analytic rings at many sub-pixel offsets (the
 * displacement is 0.003 px at R = 30 px with s = 3, w = 0.5 px, about as
 * large as what is left after correcting it). The frame's axis ratio changes
 * the pixel term by a relative (q - 1)^2 / 2, which is neglected.
 */

/**
 * Inward displacement delta of a ring of radius `radiusPx` in a profile made
 * with `subdivision` sub-pixels per side and bins of `binWidthPx`; add it to a
 * radius fitted to the profile.
 */
export function profileRadiusShiftPx(radiusPx: number, subdivision: number, binWidthPx: number): number {
  if (!(radiusPx > 0)) throw new RangeError(`radiusPx must be positive; got ${radiusPx}`);
  if (!(subdivision >= 1)) throw new RangeError(`subdivision must be >= 1; got ${subdivision}`);
  if (!(binWidthPx > 0)) throw new RangeError(`binWidthPx must be positive; got ${binWidthPx}`);
  return ((2 - 1 / (subdivision * subdivision)) / 24 + (binWidthPx * binWidthPx) / 12) / radiusPx;
}
