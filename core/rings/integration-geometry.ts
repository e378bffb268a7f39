/**
 * What every integration over one image size and one pattern frame shares: the
 * corrected radius of each pixel centre, computed once and reused by the radial
 * profile, sector profiles and the azimuthal texture of the rings.
 *
 * The corrected radius is the quadratic form of pattern-frame.ts written in
 * detector offsets dx = x - cx, dy = y - cy:
 *   R^2 = u^2 / q + q v^2,  u = dx cos a + dy sin a,  v = -dx sin a + dy cos a
 *       = kxx dx^2 + 2 kxy dx dy + kyy dy^2,
 *   kxx = cos^2 a / q + q sin^2 a,  kxy = sin a cos a (1/q - q),  kyy = sin^2 a / q + q cos^2 a.
 * Integrations evaluate pixel and sub-pixel radii exactly from this form
 * (float64); the per-pixel table below serves to skip, at the cost of one
 * load, the pixels that cannot reach a radial range or band.
 */

import { frameTransform, validateFrame, type FrameTransform, type PatternFrame } from './pattern-frame';

export interface IntegrationGeometry {
  width: number;
  height: number;
  frame: PatternFrame;
  transform: FrameTransform;
  /**
   * Corrected radius of each pixel centre, px, at [j * width + i]. Float32 (good to
   * 2^-24 relative, 0.0002 px at R = 3000 px): used to skip pixels, with a margin.
   */
  radiusPx: Float32Array;
  /** Largest pixel-centre radius in the image, px. */
  maxRadiusPx: number;
  /** Smallest pixel-centre radius in the image, px (> 0 when the centre lies outside the image). */
  minRadiusPx: number;
  /** Coefficients of R^2 = kxx dx^2 + 2 kxy dx dy + kyy dy^2. */
  kxx: number;
  kxy: number;
  kyy: number;
  /**
   * Largest |grad R| anywhere: sqrt(q), the square root of the larger eigenvalue of
   * the quadratic form. A pixel's sub-pixel radii lie within its centre radius
   * +- (half diagonal) sqrt(q).
   */
  maxRadialGradient: number;
}

/**
 * Per-pixel corrected radii of a `width` x `height` image in `frame`.
 * @param width image width, pixels (integer >= 1)
 * @param height image height, pixels (integer >= 1)
 * @throws RangeError for a non-integer or non-positive size, or an invalid frame (see validateFrame)
 */
export function prepareIntegrationGeometry(width: number, height: number, frame: PatternFrame): IntegrationGeometry {
  if (!Number.isInteger(width) || width < 1) throw new RangeError(`width must be an integer >= 1; got ${width}`);
  if (!Number.isInteger(height) || height < 1) throw new RangeError(`height must be an integer >= 1; got ${height}`);
  validateFrame(frame);
  const t = frameTransform(frame);
  const kxx = (t.cos * t.cos) * t.invQ + t.q * t.sin * t.sin;
  const kxy = t.sin * t.cos * (t.invQ - t.q);
  const kyy = (t.sin * t.sin) * t.invQ + t.q * t.cos * t.cos;
  const radiusPx = new Float32Array(width * height);
  let maxR = 0;
  let minR = Infinity;
  for (let j = 0; j < height; j++) {
    const dy = j - t.cy;
    const cyy = kyy * dy * dy;
    const bxy = 2 * kxy * dy;
    const row = j * width;
    for (let i = 0; i < width; i++) {
      const dx = i - t.cx;
      const r = Math.sqrt(dx * (kxx * dx + bxy) + cyy);
      radiusPx[row + i] = r;
      if (r > maxR) maxR = r;
      if (r < minR) minR = r;
    }
  }
  return {
    width,
    height,
    frame: { ...frame },
    transform: t,
    radiusPx,
    maxRadiusPx: maxR,
    minRadiusPx: minR,
    kxx,
    kxy,
    kyy,
    maxRadialGradient: t.sqrtQ,
  };
}

/** Offsets of the centres of s sub-pixels along one pixel axis: (a + 1/2)/s - 1/2, a = 0..s-1. */
export function subPixelOffsets(subdivision: number): Float64Array {
  const o = new Float64Array(subdivision);
  for (let a = 0; a < subdivision; a++) o[a] = (a + 0.5) / subdivision - 0.5;
  return o;
}

/** Throws a RangeError unless `subdivision` is an integer in [1, 16]. */
export function validateSubdivision(subdivision: number): void {
  if (!Number.isInteger(subdivision) || subdivision < 1 || subdivision > 16) {
    throw new RangeError(`subdivision must be an integer from 1 (no splitting) to 16; got ${subdivision}`);
  }
}

/**
 * Checks that a raster and a mask match the geometry they are integrated with.
 * @throws RangeError naming the mismatched size
 */
export function validateIntegrationInputs(
  raster: { width: number; height: number; data: ArrayLike<number> },
  mask: { width: number; height: number; excluded: ArrayLike<number> } | null,
  geometry: IntegrationGeometry,
): void {
  if (raster.width !== geometry.width || raster.height !== geometry.height) {
    throw new RangeError(
      `raster is ${raster.width} x ${raster.height} but the integration geometry was prepared for ${geometry.width} x ${geometry.height}; prepare it for this image`,
    );
  }
  if (raster.data.length !== raster.width * raster.height) {
    throw new RangeError(`raster.data holds ${raster.data.length} samples; a ${raster.width} x ${raster.height} image needs ${raster.width * raster.height}`);
  }
  if (mask) {
    if (mask.width !== raster.width || mask.height !== raster.height || mask.excluded.length !== raster.width * raster.height) {
      throw new RangeError(`mask is ${mask.width} x ${mask.height} (${mask.excluded.length} entries) but the raster is ${raster.width} x ${raster.height}; use a mask made for this image`);
    }
  }
}

/**
 * An azimuthal sector in the corrected frame: the azimuths phi with
 * (phi - startRad) mod 2 pi < widthRad, azimuth measured from +x toward +y.
 */
export interface AzimuthSector {
  startRad: number;
  /** Angular width, radians, in (0, 2 pi]. */
  widthRad: number;
}

/** Throws a RangeError unless the sector has a finite start and a width in (0, 2 pi]. */
export function validateSector(sector: AzimuthSector): void {
  if (!Number.isFinite(sector.startRad)) throw new RangeError(`sector.startRad must be finite; got ${sector.startRad}`);
  if (!(sector.widthRad > 0 && sector.widthRad <= 2 * Math.PI + 1e-12)) {
    throw new RangeError(`sector.widthRad must be in (0, 2 pi]; got ${sector.widthRad}`);
  }
}

/** True when azimuth `phiRad` lies in the sector. */
export function inSector(phiRad: number, sector: AzimuthSector): boolean {
  const twoPi = 2 * Math.PI;
  let d = (phiRad - sector.startRad) % twoPi;
  if (d < 0) d += twoPi;
  return d < sector.widthRad;
}
