/**
 * Where the pattern sits on the detector and how the projector lenses stretched
 * it: the centre and an elliptical distortion with axis ratio q = major/minor >= 1
 * whose major axis makes `angleDeg` with +x (toward +y), in [0, 180).
 *
 * The corrected frame is area-preserving: a ring of true radius R appears as an
 * ellipse with semi-axes R sqrt(q) (along the major axis) and R / sqrt(q), so R
 * is the geometric mean of the semi-axes. With u, v the offsets from the centre
 * along and across the major axis,
 *   R^2 = u^2 / q + q v^2.
 * The corrected azimuth is measured from +x toward +y (image y points down):
 *   azimuth = atan2(v sqrt(q), u / sqrt(q)) + angle.
 */

export interface PatternFrame {
  centerXPx: number;
  centerYPx: number;
  /** major/minor >= 1; 1 for a round pattern. */
  axisRatio: number;
  /** Major-axis direction, degrees from +x toward +y, in [0, 180). */
  angleDeg: number;
}

/** A round pattern centred at (x, y). */
export function roundFrame(centerXPx: number, centerYPx: number): PatternFrame {
  return { centerXPx, centerYPx, axisRatio: 1, angleDeg: 0 };
}

/** Throws a RangeError naming the bad field. */
export function validateFrame(frame: PatternFrame): void {
  if (!Number.isFinite(frame.centerXPx) || !Number.isFinite(frame.centerYPx)) {
    throw new RangeError(`pattern centre must be finite; got (${frame.centerXPx}, ${frame.centerYPx})`);
  }
  if (!(frame.axisRatio >= 1) || !Number.isFinite(frame.axisRatio)) {
    throw new RangeError(`axisRatio must be a finite number >= 1 (major/minor); got ${frame.axisRatio}`);
  }
  if (!Number.isFinite(frame.angleDeg)) throw new RangeError(`angleDeg must be finite; got ${frame.angleDeg}`);
}

/** Brings an angle in degrees into [0, 180), the range of an axis direction. */
export function normaliseAxisAngleDeg(angleDeg: number): number {
  const a = angleDeg % 180;
  return a < 0 ? a + 180 : a === 180 ? 0 : a;
}

/** Precomputed terms of a frame for hot loops. */
export interface FrameTransform {
  cx: number;
  cy: number;
  cos: number;
  sin: number;
  /** 1/q and q. */
  invQ: number;
  q: number;
  sqrtQ: number;
  angleRad: number;
}

export function frameTransform(frame: PatternFrame): FrameTransform {
  const a = (frame.angleDeg * Math.PI) / 180;
  return {
    cx: frame.centerXPx,
    cy: frame.centerYPx,
    cos: Math.cos(a),
    sin: Math.sin(a),
    invQ: 1 / frame.axisRatio,
    q: frame.axisRatio,
    sqrtQ: Math.sqrt(frame.axisRatio),
    angleRad: a,
  };
}

/** Corrected radius R of pixel position (x, y): sqrt(u^2/q + q v^2). */
export function correctedRadiusPx(t: FrameTransform, xPx: number, yPx: number): number {
  const dx = xPx - t.cx;
  const dy = yPx - t.cy;
  const u = dx * t.cos + dy * t.sin;
  const v = -dx * t.sin + dy * t.cos;
  return Math.sqrt(u * u * t.invQ + v * v * t.q);
}

/** Corrected azimuth of (x, y), radians in (-pi, pi], from +x toward +y. */
export function correctedAzimuthRad(t: FrameTransform, xPx: number, yPx: number): number {
  const dx = xPx - t.cx;
  const dy = yPx - t.cy;
  const u = dx * t.cos + dy * t.sin;
  const v = -dx * t.sin + dy * t.cos;
  let az = Math.atan2(v * t.sqrtQ, u / t.sqrtQ) + t.angleRad;
  if (az > Math.PI) az -= 2 * Math.PI;
  else if (az <= -Math.PI) az += 2 * Math.PI;
  return az;
}

/** Pixel position of corrected radius R and azimuth: the inverse of the two functions above. */
export function pixelAtCorrectedPolar(t: FrameTransform, radiusPx: number, azimuthRad: number): { xPx: number; yPx: number } {
  const th = azimuthRad - t.angleRad;
  const u = radiusPx * Math.cos(th) * t.sqrtQ;
  const v = (radiusPx * Math.sin(th)) / t.sqrtQ;
  return { xPx: t.cx + u * t.cos - v * t.sin, yPx: t.cy + u * t.sin + v * t.cos };
}
