/**
 * Exact geometry of a flat detector normal to the beam.
 *
 * A reflection of spacing d scatters through 2 theta with Bragg's law
 * lambda = 2 d sin(theta) (first order; higher orders are reflections of
 * spacing d/n). On a flat detector at distance L from the specimen, the ring
 * lies at radius R = L tan(2 theta). Nothing here uses a small-angle
 * approximation: see camera-conversions.ts for the approximate conveniences.
 *
 * Lengths on the detector are in pixels: the camera is described by its
 * wavelength and by L/p, the specimen-detector distance divided by the pixel
 * pitch ("camera length in pixels"). That ratio is what a calibration fixes.
 */

/** What the exact ring geometry needs to know about the microscope and detector. */
export interface CameraGeometry {
  /** Electron wavelength, Å. */
  wavelengthA: number;
  /** Camera length divided by pixel pitch, in pixels (dimensionless ratio L/p). */
  cameraLengthPx: number;
}

function checkGeometry(g: CameraGeometry): void {
  if (!(g.wavelengthA > 0) || !Number.isFinite(g.wavelengthA)) {
    throw new RangeError(`wavelengthA must be positive and finite; got ${g.wavelengthA}`);
  }
  if (!(g.cameraLengthPx > 0) || !Number.isFinite(g.cameraLengthPx)) {
    throw new RangeError(`cameraLengthPx must be positive and finite; got ${g.cameraLengthPx}`);
  }
}

/**
 * Bragg angle theta (radians) of spacing `dSpacingA` at `wavelengthA`:
 * theta = asin(lambda / 2d). Throws when lambda > 2d (no such reflection).
 */
export function braggAngleRad(dSpacingA: number, wavelengthA: number): number {
  if (!(dSpacingA > 0)) throw new RangeError(`dSpacingA must be positive; got ${dSpacingA}`);
  const s = wavelengthA / (2 * dSpacingA);
  if (s > 1) {
    throw new RangeError(`no reflection: lambda = ${wavelengthA} Å exceeds 2d = ${2 * dSpacingA} Å`);
  }
  return Math.asin(s);
}

/**
 * Ring radius on a flat detector, pixels: R = (L/p) tan(2 asin(lambda / 2d)).
 * Throws when 2 theta >= 90 degrees (the ring cannot meet a detector plane
 * normal to the beam).
 */
export function ringRadiusPx(dSpacingA: number, camera: CameraGeometry): number {
  checkGeometry(camera);
  const twoTheta = 2 * braggAngleRad(dSpacingA, camera.wavelengthA);
  if (twoTheta >= Math.PI / 2) {
    throw new RangeError(`d = ${dSpacingA} Å scatters to 2theta >= 90 degrees and misses a flat detector`);
  }
  return camera.cameraLengthPx * Math.tan(twoTheta);
}

/** Scattering angle 2 theta (radians) of a point at `radiusPx` from the pattern centre: atan(R / (L/p)). */
export function scatteringAngleRad(radiusPx: number, cameraLengthPx: number): number {
  return Math.atan2(radiusPx, cameraLengthPx);
}

/**
 * Inverse of ringRadiusPx: d = lambda / (2 sin(atan(R / (L/p)) / 2)), Å.
 * @param radiusPx ring radius in pixels, > 0
 */
export function dSpacingFromRadiusA(radiusPx: number, camera: CameraGeometry): number {
  checkGeometry(camera);
  if (!(radiusPx > 0)) throw new RangeError(`radiusPx must be positive; got ${radiusPx}`);
  const twoTheta = scatteringAngleRad(radiusPx, camera.cameraLengthPx);
  return camera.wavelengthA / (2 * Math.sin(twoTheta / 2));
}

/**
 * Length of the scattering vector at `radiusPx`, 1/Å: q = 1/d = 2 sin(theta) / lambda.
 * Unlike R it is not proportional to radius away from small angles.
 */
export function reciprocalRadiusPerA(radiusPx: number, camera: CameraGeometry): number {
  checkGeometry(camera);
  if (radiusPx === 0) return 0;
  return (2 * Math.sin(scatteringAngleRad(Math.abs(radiusPx), camera.cameraLengthPx) / 2)) / camera.wavelengthA;
}
