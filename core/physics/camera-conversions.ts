/**
 * Conversions among the ways a camera's scale is written down. Each function
 * says whether it is exact or small-angle.
 *
 * - camera length L and pixel pitch p: the physical description. L/p is exact.
 * - camera constant lambda*L (Å mm, or Å px when L is in pixels): from the
 *   small-angle form R d = lambda L of R = L tan(2 asin(lambda / 2d)).
 * - reciprocal scale per pixel, 1/nm per px, as microscope camera software
 *   writes it: the small-angle spatial-frequency step at the pattern centre,
 *   p / (lambda L). Annula reads such a scale as the centre value and then
 *   applies the exact geometry, i.e. L/p = 1 / (lambda * scale).
 */

import { ringRadiusPx, type CameraGeometry } from './detector-geometry';

const A_PER_NM = 10;

/** L/p from the physical camera length and pixel pitch (exact; binning multiplies p). */
export function cameraLengthPxFromPhysical(cameraLengthM: number, pixelSizeM: number): number {
  if (!(cameraLengthM > 0)) throw new RangeError(`cameraLengthM must be positive; got ${cameraLengthM}`);
  if (!(pixelSizeM > 0)) throw new RangeError(`pixelSizeM must be positive; got ${pixelSizeM}`);
  return cameraLengthM / pixelSizeM;
}

/** Camera constant lambda * L/p in Å px (small-angle: R d = lambda L). */
export function cameraConstantAPx(camera: CameraGeometry): number {
  return camera.wavelengthA * camera.cameraLengthPx;
}

/** Camera constant lambda * L in Å mm for a physical camera length (small-angle). */
export function cameraConstantAMm(wavelengthA: number, cameraLengthM: number): number {
  return wavelengthA * cameraLengthM * 1e3;
}

/** L/p from a camera constant in Å px at a given wavelength (inverts cameraConstantAPx). */
export function cameraLengthPxFromCameraConstant(cameraConstantAPxValue: number, wavelengthA: number): number {
  if (!(cameraConstantAPxValue > 0)) throw new RangeError(`camera constant must be positive; got ${cameraConstantAPxValue}`);
  return cameraConstantAPxValue / wavelengthA;
}

/** Reciprocal scale at the centre, 1/nm per pixel: p / (lambda L) (small-angle at the centre). */
export function reciprocalScalePerNmPerPx(camera: CameraGeometry): number {
  return A_PER_NM / (camera.wavelengthA * camera.cameraLengthPx);
}

/** L/p from a reciprocal scale in 1/nm per pixel, read as the centre (small-angle) value. */
export function cameraLengthPxFromReciprocalScale(scalePerNmPerPx: number, wavelengthA: number): number {
  if (!(scalePerNmPerPx > 0)) throw new RangeError(`reciprocal scale must be positive; got ${scalePerNmPerPx}`);
  return A_PER_NM / (wavelengthA * scalePerNmPerPx);
}

/** Physical camera length in metres given L/p and the pixel pitch (exact). */
export function cameraLengthMFromPx(cameraLengthPx: number, pixelSizeM: number): number {
  return cameraLengthPx * pixelSizeM;
}

/** d from radius with the small-angle camera constant: d = lambda L / R, Å. */
export function dSpacingSmallAngleA(radiusPx: number, camera: CameraGeometry): number {
  if (!(radiusPx > 0)) throw new RangeError(`radiusPx must be positive; got ${radiusPx}`);
  return cameraConstantAPx(camera) / radiusPx;
}

/**
 * Relative error of the small-angle d at the radius where the exact geometry
 * puts spacing `dSpacingA`: (d_small - d) / d. Negative: the small-angle form
 * underestimates d, by about 1.5 (lambda / 2d)^2 (series of 2 sin(theta) / tan(2 theta)).
 */
export function smallAngleRelativeErrorD(dSpacingA: number, camera: CameraGeometry): number {
  const radiusPx = ringRadiusPx(dSpacingA, camera);
  return dSpacingSmallAngleA(radiusPx, camera) / dSpacingA - 1;
}
