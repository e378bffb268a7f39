/**
 * First-order propagation of radius, camera-length and wavelength
 * uncertainties into d (GUM, JCGM 100:2008, section 5: the law of propagation
 * of uncertainty, with the correlated form of its eq. 13 for R and L/p).
 *
 * d = lambda / (2 sin(phi / 2)),  phi = atan(R / Lp)   (exact flat-detector geometry)
 *   dd/dphi    = -(d / 2) cot(phi / 2)
 *   dphi/dR    =  Lp / (R^2 + Lp^2)
 *   dphi/dLp   = -R / (R^2 + Lp^2)
 *   dd/dlambda =  d / lambda
 *
 * When the camera was calibrated on a standard at the same voltage, the
 * calibration already absorbs the wavelength: pass wavelengthSigmaA = 0 then.
 */

import { dSpacingFromRadiusA, type CameraGeometry } from './detector-geometry';

export interface CameraUncertainty {
  /** Standard uncertainty of L/p, pixels. */
  cameraLengthSigmaPx: number;
  /** Standard uncertainty of the wavelength, Å (0 when a calibration absorbs it). */
  wavelengthSigmaA: number;
  /** Correlation coefficient between the ring radius and L/p, in [-1, 1]; 0 when independent. */
  radiusCameraCorrelation?: number;
}

export interface DSpacingEstimate {
  dA: number;
  dSigmaA: number;
  /** Each input's share of the variance, Å^2 (sums to dSigmaA^2 when uncorrelated). */
  varianceParts: { radius: number; cameraLength: number; wavelength: number; correlation: number };
}

/**
 * d with its standard uncertainty.
 * @param radiusPx ring radius, pixels (> 0)
 * @param radiusSigmaPx standard uncertainty of the radius, pixels (>= 0)
 */
export function dSpacingWithUncertainty(
  radiusPx: number,
  radiusSigmaPx: number,
  camera: CameraGeometry,
  sigma: CameraUncertainty,
): DSpacingEstimate {
  if (!(radiusSigmaPx >= 0)) throw new RangeError(`radiusSigmaPx must be >= 0; got ${radiusSigmaPx}`);
  if (!(sigma.cameraLengthSigmaPx >= 0)) throw new RangeError(`cameraLengthSigmaPx must be >= 0; got ${sigma.cameraLengthSigmaPx}`);
  if (!(sigma.wavelengthSigmaA >= 0)) throw new RangeError(`wavelengthSigmaA must be >= 0; got ${sigma.wavelengthSigmaA}`);
  const rho = sigma.radiusCameraCorrelation ?? 0;
  if (!(rho >= -1 && rho <= 1)) throw new RangeError(`radiusCameraCorrelation must be in [-1, 1]; got ${rho}`);

  const dA = dSpacingFromRadiusA(radiusPx, camera);
  const lp = camera.cameraLengthPx;
  const phi = Math.atan2(radiusPx, lp);
  const dd_dphi = (-dA / 2) / Math.tan(phi / 2);
  const r2l2 = radiusPx * radiusPx + lp * lp;
  const dd_dR = dd_dphi * (lp / r2l2);
  const dd_dL = dd_dphi * (-radiusPx / r2l2);
  const dd_dlambda = dA / camera.wavelengthA;

  const radius = (dd_dR * radiusSigmaPx) ** 2;
  const cameraLength = (dd_dL * sigma.cameraLengthSigmaPx) ** 2;
  const wavelength = (dd_dlambda * sigma.wavelengthSigmaA) ** 2;
  const correlation = 2 * rho * dd_dR * dd_dL * radiusSigmaPx * sigma.cameraLengthSigmaPx;
  const variance = Math.max(0, radius + cameraLength + wavelength + correlation);
  return { dA, dSigmaA: Math.sqrt(variance), varianceParts: { radius, cameraLength, wavelength, correlation } };
}
