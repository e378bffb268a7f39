/**
 * The pseudo-Voigt line shape, normalised as P. Thompson, D. E. Cox and J. B. Hastings,
 * J. Appl. Cryst. 20 (1987) 79: a mixture, by area, of a Lorentzian and a Gaussian of
 * the same full width at half maximum Gamma, each of unit area,
 *
 *   pV(x) = eta L(x) + (1 - eta) G(x),
 *   L(x)  = (2 / (pi Gamma)) / (1 + 4 x^2 / Gamma^2),
 *   G(x)  = (2 / Gamma) sqrt(ln 2 / pi) exp(-4 ln 2 x^2 / Gamma^2),
 *
 * so pV has unit area, FWHM Gamma for every eta in [0, 1], and eta is the Lorentzian
 * fraction of the area (not of the peak height).
 */

const LN2 = Math.LN2;
const GAUSS_PEAK_TIMES_FWHM = 2 * Math.sqrt(LN2 / Math.PI);
const LORENTZ_PEAK_TIMES_FWHM = 2 / Math.PI;

/** Throws a RangeError unless fwhm > 0 and 0 <= eta <= 1 (both finite). */
export function checkPseudoVoigt(fwhmPx: number, eta: number, label = ''): void {
  if (!(fwhmPx > 0) || !Number.isFinite(fwhmPx)) throw new RangeError(`${label}fwhmPx must be > 0 px; got ${fwhmPx}`);
  if (!(eta >= 0 && eta <= 1)) throw new RangeError(`${label}eta must lie in [0, 1] (the Lorentzian fraction of the area); got ${eta}`);
}

/**
 * Unit-area pseudo-Voigt at offset `xPx` from its centre, per px.
 * @param fwhmPx full width at half maximum, px, > 0
 * @param eta Lorentzian fraction of the area, in [0, 1]
 */
export function pseudoVoigt(xPx: number, fwhmPx: number, eta: number): number {
  const z2 = (4 * xPx * xPx) / (fwhmPx * fwhmPx);
  return (eta * LORENTZ_PEAK_TIMES_FWHM) / (fwhmPx * (1 + z2)) + ((1 - eta) * GAUSS_PEAK_TIMES_FWHM * Math.exp(-LN2 * z2)) / fwhmPx;
}

/** Peak value pV(0) of the unit-area pseudo-Voigt: (eta 2/pi + (1 - eta) 2 sqrt(ln2/pi)) / Gamma, per px. */
export function pseudoVoigtPeak(fwhmPx: number, eta: number): number {
  return (eta * LORENTZ_PEAK_TIMES_FWHM + (1 - eta) * GAUSS_PEAK_TIMES_FWHM) / fwhmPx;
}
