/**
 * A conic a x^2 + b xy + c y^2 + d x + e y + f = 0 and the ellipse it describes,
 * in the project's convention: axis ratio q = major/minor >= 1 and the major
 * axis at angleDeg from +x toward +y (image y points down), in [0, 180).
 *
 * Conversion (analytic geometry of conics, e.g. I. N. Bronshtein et al.,
 * Handbook of Mathematics, 5th ed., section 3.5.2.11, from memory):
 *  - centre: the gradient vanishes, [2a b; b 2c] [x0; y0] = -[d; e], so
 *      x0 = (b e - 2 c d) / (4ac - b^2),  y0 = (b d - 2 a e) / (4ac - b^2);
 *  - value at the centre f0 = f + (d x0 + e y0) / 2;
 *  - the quadratic form [[a, b/2], [b/2, c]] has eigenvalues
 *      lambda = (a + c)/2 -/+ sqrt(((a - c)/2)^2 + (b/2)^2),
 *    and semi-axes sqrt(-f0 / lambda) (the smaller lambda gives the major axis);
 *  - with a - c = (l1 - l2) cos 2t and b = (l1 - l2) sin 2t for the larger
 *    eigenvalue l1 along t, the minor axis lies at t = atan2(b, a - c)/2 and the
 *    major axis at t + 90 degrees.
 * An ellipse needs 4ac - b^2 > 0 and f0 of the opposite sign to a + c.
 */
import { normaliseAxisAngleDeg } from './pattern-frame';

export interface Conic {
  a: number;
  b: number;
  c: number;
  d: number;
  e: number;
  f: number;
}

export interface EllipseGeometry {
  centerXPx: number;
  centerYPx: number;
  semiMajorPx: number;
  semiMinorPx: number;
  /** semiMajor / semiMinor >= 1. */
  axisRatio: number;
  /** Major axis, degrees from +x toward +y, [0, 180); 0 for a circle. */
  angleDeg: number;
  /** Geometric mean of the semi-axes (the corrected radius of the ring), px. */
  radiusPx: number;
}

/** The ellipse of a conic, or null when the conic is not a real ellipse (hyperbola, parabola, empty, degenerate). */
export function ellipseFromConic(conic: Conic): EllipseGeometry | null {
  let { a, b, c, d, e, f } = conic;
  if (a + c < 0) { a = -a; b = -b; c = -c; d = -d; e = -e; f = -f; }
  const disc = 4 * a * c - b * b;
  const scale = Math.max(Math.abs(a), Math.abs(b), Math.abs(c));
  if (!(disc > 1e-14 * scale * scale)) return null;
  const x0 = (b * e - 2 * c * d) / disc;
  const y0 = (b * d - 2 * a * e) / disc;
  const f0 = f + 0.5 * (d * x0 + e * y0);
  if (!(f0 < 0)) return null;
  const mean = 0.5 * (a + c);
  const root = Math.hypot(0.5 * (a - c), 0.5 * b);
  const lMin = mean - root;
  const lMax = mean + root;
  if (!(lMin > 0)) return null;
  const semiMajorPx = Math.sqrt(-f0 / lMin);
  const semiMinorPx = Math.sqrt(-f0 / lMax);
  const axisRatio = semiMajorPx / semiMinorPx;
  const round = root <= 1e-13 * mean;
  const angleDeg = round ? 0 : normaliseAxisAngleDeg((0.5 * Math.atan2(b, a - c) * 180) / Math.PI + 90);
  return {
    centerXPx: x0,
    centerYPx: y0,
    semiMajorPx,
    semiMinorPx,
    axisRatio,
    angleDeg,
    radiusPx: Math.sqrt(semiMajorPx * semiMinorPx),
  };
}

/**
 * The conic of an ellipse given by centre, semi-axes and major-axis angle
 * (x'^2/A^2 + y'^2/B^2 = 1 in axes rotated by the angle), scaled so f0 = -1.
 * @throws RangeError for non-positive or non-finite semi-axes
 */
export function conicFromEllipse(centerXPx: number, centerYPx: number, semiMajorPx: number, semiMinorPx: number, angleDeg: number): Conic {
  if (!(semiMajorPx > 0) || !(semiMinorPx > 0) || !Number.isFinite(semiMajorPx) || !Number.isFinite(semiMinorPx)) {
    throw new RangeError(`semi-axes must be positive and finite; got ${semiMajorPx}, ${semiMinorPx}`);
  }
  const t = (angleDeg * Math.PI) / 180;
  const co = Math.cos(t);
  const si = Math.sin(t);
  const ia = 1 / (semiMajorPx * semiMajorPx);
  const ib = 1 / (semiMinorPx * semiMinorPx);
  const a = co * co * ia + si * si * ib;
  const b = 2 * co * si * (ia - ib);
  const c = si * si * ia + co * co * ib;
  return {
    a, b, c,
    d: -2 * a * centerXPx - b * centerYPx,
    e: -b * centerXPx - 2 * c * centerYPx,
    f: a * centerXPx * centerXPx + b * centerXPx * centerYPx + c * centerYPx * centerYPx - 1,
  };
}
