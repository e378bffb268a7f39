/**
 * The pseudo-Voigt peak shape: a mixture of a Lorentzian and a Gaussian of the
 * same full width at half maximum, each of unit area,
 *
 *   pV(r) = A [eta L(r) + (1 - eta) G(r)],   z = (r - R) / F,
 *   L(r) = (2 / (pi F)) / (1 + 4 z^2),
 *   G(r) = (2 sqrt(ln 2 / pi) / F) exp(-4 ln 2 z^2),
 *
 * with area A, centre R, FWHM F and mixing 0 <= eta <= 1 (the form and
 * parameterisation of P. Thompson, D. E. Cox and J. B. Hastings, J. Appl. Cryst.
 * 20 (1987) 79; from memory). The peak height is A [eta 2/(pi F) + (1 - eta) 2
 * sqrt(ln 2 / pi) / F].
 *
 * For a Voigt profile with Gaussian and Lorentzian FWHMs fG and fL, the same
 * paper gives the pseudo-Voigt that approximates it (coefficients from memory;
 * the reference test finds F within 0.4 % of the half-maximum width of scipy's
 * Voigt profile, the relations having been fitted to the whole shape):
 *   F = (fG^5 + 2.69269 fG^4 fL + 2.42843 fG^3 fL^2 + 4.47163 fG^2 fL^3 + 0.07842 fG fL^4 + fL^5)^(1/5),
 *   eta = 1.36603 (fL/F) - 0.47719 (fL/F)^2 + 0.11116 (fL/F)^3.
 */

const LN2 = Math.LN2;
const GAUSS_NORM = 2 * Math.sqrt(LN2 / Math.PI);
const FOUR_LN2 = 4 * LN2;

/** A pseudo-Voigt peak: area (profile units x px), centre (px), FWHM (px), mixing eta. */
export interface PseudoVoigtPeak {
  area: number;
  centerPx: number;
  fwhmPx: number;
  eta: number;
}

/** Value of the peak at r. */
export function pseudoVoigt(peak: PseudoVoigtPeak, rPx: number): number {
  const z = (rPx - peak.centerPx) / peak.fwhmPx;
  const z2 = z * z;
  const l = 2 / (Math.PI * peak.fwhmPx) / (1 + 4 * z2);
  const g = (GAUSS_NORM / peak.fwhmPx) * Math.exp(-FOUR_LN2 * z2);
  return peak.area * (peak.eta * l + (1 - peak.eta) * g);
}

/** Peak height: the value at the centre. */
export function pseudoVoigtHeight(peak: PseudoVoigtPeak): number {
  return (peak.area * (peak.eta * (2 / Math.PI) + (1 - peak.eta) * GAUSS_NORM)) / peak.fwhmPx;
}

/** Area that gives height `height` for a FWHM and eta: the inverse of pseudoVoigtHeight. */
export function pseudoVoigtAreaFromHeight(height: number, fwhmPx: number, eta: number): number {
  return (height * fwhmPx) / (eta * (2 / Math.PI) + (1 - eta) * GAUSS_NORM);
}

/**
 * Value and partial derivatives at r, written into `out`:
 * out[0] = pV, out[1] = d/dA, out[2] = d/dR, out[3] = d/dF, out[4] = d/deta.
 *   dL/dR = L 8 z / (F (1 + 4 z^2)),  dL/dF = (L / F) (8 z^2 / (1 + 4 z^2) - 1),
 *   dG/dR = G 8 ln2 z / F,            dG/dF = (G / F) (8 ln2 z^2 - 1).
 */
export function pseudoVoigtWithDerivatives(area: number, centerPx: number, fwhmPx: number, eta: number, rPx: number, out: Float64Array): void {
  const z = (rPx - centerPx) / fwhmPx;
  const z2 = z * z;
  const d = 1 + 4 * z2;
  const l = 2 / (Math.PI * fwhmPx) / d;
  const g = (GAUSS_NORM / fwhmPx) * Math.exp(-FOUR_LN2 * z2);
  const shape = eta * l + (1 - eta) * g;
  const dlR = (l * 8 * z) / (fwhmPx * d);
  const dgR = (g * 8 * LN2 * z) / fwhmPx;
  const dlF = (l / fwhmPx) * ((8 * z2) / d - 1);
  const dgF = (g / fwhmPx) * (8 * LN2 * z2 - 1);
  out[0] = area * shape;
  out[1] = shape;
  out[2] = area * (eta * dlR + (1 - eta) * dgR);
  out[3] = area * (eta * dlF + (1 - eta) * dgF);
  out[4] = area * (l - g);
}

/**
 * The pseudo-Voigt that approximates a Voigt of Gaussian FWHM fG and Lorentzian
 * FWHM fL (Thompson, Cox and Hastings 1987; coefficients from memory).
 * @throws RangeError unless both widths are >= 0, finite, and not both 0
 */
export function pseudoVoigtFromVoigtWidths(gaussianFwhmPx: number, lorentzianFwhmPx: number): { fwhmPx: number; eta: number } {
  const g = gaussianFwhmPx;
  const l = lorentzianFwhmPx;
  if (!(g >= 0) || !(l >= 0) || !Number.isFinite(g) || !Number.isFinite(l) || g + l === 0) {
    throw new RangeError(`Voigt widths must be finite, >= 0 and not both 0; got fG = ${g}, fL = ${l}`);
  }
  const f5 = g ** 5 + 2.69269 * g ** 4 * l + 2.42843 * g ** 3 * l ** 2 + 4.47163 * g ** 2 * l ** 3 + 0.07842 * g * l ** 4 + l ** 5;
  const f = f5 ** 0.2;
  const x = l / f;
  return { fwhmPx: f, eta: 1.36603 * x - 0.47719 * x * x + 0.11116 * x * x * x };
}
