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
 * (float64). An IntegrationFrame holds the coefficients and the radius range
 * of the image (found row by row in O(height), without visiting every pixel);
 * an IntegrationGeometry adds the per-pixel table of corrected radii, for
 * callers that want it (the integrations themselves no longer read it: they
 * compute each radius where they need it, which lets them work on any band of
 * rows without a shared table).
 */

import { frameTransform, validateFrame, type FrameTransform, type PatternFrame } from './pattern-frame';

/** The frame of one image size: plain data, small, the same for every band of rows. */
export interface IntegrationFrame {
  width: number;
  height: number;
  frame: PatternFrame;
  transform: FrameTransform;
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

/** An IntegrationFrame with the corrected radius of every pixel centre. */
export interface IntegrationGeometry extends IntegrationFrame {
  /**
   * Corrected radius of each pixel centre, px, at [j * width + i]. Float32 (good to
   * 2^-24 relative, 0.0002 px at R = 3000 px).
   */
  radiusPx: Float32Array;
}

function checkSize(width: number, height: number): void {
  if (!Number.isInteger(width) || width < 1) throw new RangeError(`width must be an integer >= 1; got ${width}`);
  if (!Number.isInteger(height) || height < 1) throw new RangeError(`height must be an integer >= 1; got ${height}`);
}

function quadraticForm(t: FrameTransform): { kxx: number; kxy: number; kyy: number } {
  return {
    kxx: (t.cos * t.cos) * t.invQ + t.q * t.sin * t.sin,
    kxy: t.sin * t.cos * (t.invQ - t.q),
    kyy: (t.sin * t.sin) * t.invQ + t.q * t.cos * t.cos,
  };
}

/**
 * The frame of a `width` x `height` image for integration: the quadratic form and
 * the smallest and largest pixel-centre radius, without a per-pixel table.
 *
 * Along row j, R^2 = kxx dx^2 + (2 kxy dy) dx + kyy dy^2 is a convex quadratic in
 * dx (kxx > 0), so the row's largest value is at one of its two end pixels and
 * its smallest at one of the pixels next to the vertex dx = -kxy dy / kxx
 * (clamped to the row); those candidates are evaluated with exactly the
 * expression of the per-pixel table, so minRadiusPx and maxRadiusPx equal the
 * extremes of the table computed in float64 (checked in the unit tests).
 * @throws RangeError for a non-integer or non-positive size, or an invalid frame (see validateFrame)
 */
export function integrationFrame(width: number, height: number, frame: PatternFrame): IntegrationFrame {
  checkSize(width, height);
  validateFrame(frame);
  const t = frameTransform(frame);
  const { kxx, kxy, kyy } = quadraticForm(t);
  let maxR = 0;
  let minR = Infinity;
  for (let j = 0; j < height; j++) {
    const dy = j - t.cy;
    const cyy = kyy * dy * dy;
    const bxy = 2 * kxy * dy;
    const vertex = Math.round(t.cx - (kxy * dy) / kxx);
    const first = Math.max(0, Math.min(width - 1, vertex - 2));
    const last = Math.max(0, Math.min(width - 1, vertex + 2));
    for (let i = first; i <= last; i++) {
      const dx = i - t.cx;
      const r = Math.sqrt(dx * (kxx * dx + bxy) + cyy);
      if (r < minR) minR = r;
      if (r > maxR) maxR = r;
    }
    for (const i of [0, width - 1]) {
      const dx = i - t.cx;
      const r = Math.sqrt(dx * (kxx * dx + bxy) + cyy);
      if (r > maxR) maxR = r;
      if (r < minR) minR = r;
    }
  }
  return { width, height, frame: { ...frame }, transform: t, maxRadiusPx: maxR, minRadiusPx: minR, kxx, kxy, kyy, maxRadialGradient: t.sqrtQ };
}

/** The IntegrationFrame part of a geometry (without its per-pixel table: small enough to send to a worker). */
export function integrationFrameOf(g: IntegrationFrame): IntegrationFrame {
  return {
    width: g.width,
    height: g.height,
    frame: { ...g.frame },
    transform: { ...g.transform },
    maxRadiusPx: g.maxRadiusPx,
    minRadiusPx: g.minRadiusPx,
    kxx: g.kxx,
    kxy: g.kxy,
    kyy: g.kyy,
    maxRadialGradient: g.maxRadialGradient,
  };
}

/**
 * Per-pixel corrected radii of a `width` x `height` image in `frame`.
 * @param width image width, pixels (integer >= 1)
 * @param height image height, pixels (integer >= 1)
 * @throws RangeError for a non-integer or non-positive size, or an invalid frame (see validateFrame)
 */
export function prepareIntegrationGeometry(width: number, height: number, frame: PatternFrame): IntegrationGeometry {
  checkSize(width, height);
  validateFrame(frame);
  const t = frameTransform(frame);
  const { kxx, kxy, kyy } = quadraticForm(t);
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
  geometry: IntegrationFrame,
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
