/**
 * The radial shape of one simulated ring: a pseudo-Voigt in corrected radius (see
 * pseudo-voigt.ts), scaled to 1 at its centre, with its far Lorentzian tails rolled
 * off so that every ring has a finite extent:
 *
 *   p(x) = pV(x) / pV(0) * w(|x|),
 *   w = 1                                                  for |x| <= 10 Gamma,
 *   w = (1 + cos(pi (|x| - 10 Gamma) / (10 Gamma))) / 2     for 10 Gamma < |x| < 20 Gamma,
 *   w = 0                                                  beyond 20 Gamma.
 *
 * Within 10 Gamma of the centre the ring is the exact pseudo-Voigt (so its FWHM is Gamma
 * and its eta is eta); there a Lorentzian has fallen to 1/401 of its peak. The roll-off
 * is smooth (continuous with a continuous slope), so no edge appears in the image, and
 * the ring's area is computed with it (ringLineShapeArea), so the truth stays exact.
 */

import { pseudoVoigt, pseudoVoigtHeight } from '../rings/pseudo-voigt';

/** Throws a RangeError unless fwhm > 0 and 0 <= eta <= 1 (both finite). */
export function checkPseudoVoigt(fwhmPx: number, eta: number, label = ''): void {
  if (!(fwhmPx > 0) || !Number.isFinite(fwhmPx)) throw new RangeError(`${label}fwhmPx must be > 0 px; got ${fwhmPx}`);
  if (!(eta >= 0 && eta <= 1)) throw new RangeError(`${label}eta must lie in [0, 1] (the Lorentzian fraction of the area); got ${eta}`);
}

/** Where the roll-off starts and where the ring ends, in units of its FWHM. */
export const RING_TAPER_START_FWHM = 10;
export const RING_EXTENT_FWHM = 20;

export interface RingLineShape {
  /** Full width at half maximum, px. */
  fwhmPx: number;
  /** Lorentzian fraction of the pseudo-Voigt's area (Thompson, Cox and Hastings 1987). */
  eta: number;
  /** |x| beyond which the shape is rolled off, px (10 FWHM). */
  taperStartPx: number;
  /** |x| beyond which the shape is 0, px (20 FWHM). */
  extentPx: number;
}

/** The rolled-off pseudo-Voigt of FWHM `fwhmPx` (px, > 0) and Lorentzian fraction `eta` (0 to 1). */
export function ringLineShape(fwhmPx: number, eta: number): RingLineShape {
  checkPseudoVoigt(fwhmPx, eta);
  return { fwhmPx, eta, taperStartPx: RING_TAPER_START_FWHM * fwhmPx, extentPx: RING_EXTENT_FWHM * fwhmPx };
}

/** p(x): the shape at offset `xPx` from the ring centre, 1 at the centre, 0 beyond the extent. */
export function ringLineShapeValue(shape: RingLineShape, xPx: number): number {
  const ax = Math.abs(xPx);
  if (ax >= shape.extentPx) return 0;
  // The same unit-area pseudo-Voigt the peak fits use (core/rings/pseudo-voigt.ts), scaled to 1 at its centre.
  const unit = { area: 1, centerPx: 0, fwhmPx: shape.fwhmPx, eta: shape.eta };
  const value = pseudoVoigt(unit, ax) / pseudoVoigtHeight(unit);
  if (ax <= shape.taperStartPx) return value;
  const t = (ax - shape.taperStartPx) / (shape.extentPx - shape.taperStartPx);
  return value * 0.5 * (1 + Math.cos(Math.PI * t));
}

/**
 * Integral of p(x) w(x) over the part of the ring at radius >= 0, for a ring centred at
 * `centreRadiusPx`, with composite Simpson's rule on 8000 intervals over the ring's 40-FWHM span
 * (200 per FWHM; relative error below 1e-9 for these smooth shapes):
 *   area  = integral p(R - R0) dR          (px; times a height in counts/px: the area under the radial profile)
 *   areaTimesCircumference = integral p(R - R0) 2 pi R dR   (px^2; times a height: the ring's total counts)
 * The roll-off makes `area` smaller than the untapered 1 / pV(0) by a few per cent of
 * the Lorentzian part (the Lorentzian area beyond 10 Gamma is 1 - (2/pi) atan(20) = 3.2%).
 */
export function ringLineShapeArea(shape: RingLineShape, centreRadiusPx: number): { areaPx: number; areaTimesCircumferencePx2: number } {
  const lo = Math.max(0, centreRadiusPx - shape.extentPx);
  const hi = centreRadiusPx + shape.extentPx;
  const n = 8000;
  const h = (hi - lo) / n;
  let area = 0;
  let moment = 0;
  for (let i = 0; i <= n; i++) {
    const r = lo + i * h;
    const weight = i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2;
    const p = ringLineShapeValue(shape, r - centreRadiusPx);
    area += weight * p;
    moment += weight * p * r;
  }
  return { areaPx: (area * h) / 3, areaTimesCircumferencePx2: (2 * Math.PI * moment * h) / 3 };
}
