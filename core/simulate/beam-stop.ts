/**
 * A beam stop: an opaque disc held over the direct beam by a stem (a straight strip)
 * that runs from the disc's centre to beyond the detector's edge. Both lie in detector
 * pixel coordinates (the stop is a physical object near the detector, so the projector
 * lenses' ellipticity does not distort it). A point (x, y) is covered when
 *
 *   (x - x_s)^2 + (y - y_s)^2 <= r^2                                   (disc), or
 *   t = (x - x_s) cos(phi) + (y - y_s) sin(phi) >= 0  and
 *   |-(x - x_s) sin(phi) + (y - y_s) cos(phi)| <= w / 2                (stem),
 *
 * with phi the stem direction from +x toward +y and w its width. A covered point passes
 * the fraction `transmission` of what falls on it (a thin stop lets a little through).
 */

export interface BeamStopSpec {
  /** Disc centre, px (default: the pattern centre). */
  centerXPx: number;
  centerYPx: number;
  /** Disc radius, px, > 0. */
  radiusPx: number;
  /** Direction of the stem from the disc centre, degrees from +x toward +y. */
  stemAngleDeg: number;
  /** Stem width, px, 0 (no stem) to 2 radiusPx. */
  stemWidthPx: number;
  /** Fraction of the intensity passed where covered, 0 <= transmission < 1. */
  transmission: number;
}

/** Throws a RangeError naming the bad field. */
export function checkBeamStop(stop: BeamStopSpec, label = 'beamStop.'): void {
  if (!Number.isFinite(stop.centerXPx) || !Number.isFinite(stop.centerYPx)) {
    throw new RangeError(`${label}centerXPx and centerYPx must be finite; got (${stop.centerXPx}, ${stop.centerYPx})`);
  }
  if (!(stop.radiusPx > 0) || !Number.isFinite(stop.radiusPx)) throw new RangeError(`${label}radiusPx must be > 0 px; got ${stop.radiusPx}`);
  if (!Number.isFinite(stop.stemAngleDeg)) throw new RangeError(`${label}stemAngleDeg must be finite; got ${stop.stemAngleDeg}`);
  if (!(stop.stemWidthPx >= 0 && stop.stemWidthPx <= 2 * stop.radiusPx)) {
    throw new RangeError(`${label}stemWidthPx must lie in [0, 2 radiusPx] = [0, ${2 * stop.radiusPx}] px; got ${stop.stemWidthPx}`);
  }
  if (!(stop.transmission >= 0 && stop.transmission < 1)) {
    throw new RangeError(`${label}transmission must lie in [0, 1) (the fraction passed where covered); got ${stop.transmission}`);
  }
}

/** Precomputed terms of a stop for hot loops. */
export interface BeamStopShape {
  x: number;
  y: number;
  radiusSquared: number;
  radius: number;
  cos: number;
  sin: number;
  halfWidth: number;
  transmission: number;
}

export function beamStopShape(stop: BeamStopSpec): BeamStopShape {
  const a = (stop.stemAngleDeg * Math.PI) / 180;
  return {
    x: stop.centerXPx,
    y: stop.centerYPx,
    radiusSquared: stop.radiusPx * stop.radiusPx,
    radius: stop.radiusPx,
    cos: Math.cos(a),
    sin: Math.sin(a),
    halfWidth: stop.stemWidthPx / 2,
    transmission: stop.transmission,
  };
}

/** Whether the point (x, y), px, lies under the stop (disc or stem), edges included. */
export function beamStopCovers(shape: BeamStopShape, xPx: number, yPx: number): boolean {
  const dx = xPx - shape.x;
  const dy = yPx - shape.y;
  if (dx * dx + dy * dy <= shape.radiusSquared) return true;
  if (shape.halfWidth <= 0) return false;
  const along = dx * shape.cos + dy * shape.sin;
  return along >= 0 && Math.abs(-dx * shape.sin + dy * shape.cos) <= shape.halfWidth;
}

/**
 * How a whole pixel centred at (x, y) meets the stop: 'clear' when every point within
 * 0.75 px (beyond the half-diagonal 0.707) is uncovered, 'covered' when every such point
 * is covered, 'edge' otherwise. Lets the simulator test single samples only at the edge.
 */
export function beamStopPixelClass(shape: BeamStopShape, xPx: number, yPx: number): 'clear' | 'covered' | 'edge' {
  const margin = 0.75;
  const dx = xPx - shape.x;
  const dy = yPx - shape.y;
  const distance = Math.sqrt(dx * dx + dy * dy);
  if (distance <= shape.radius - margin) return 'covered';
  const along = dx * shape.cos + dy * shape.sin;
  const across = Math.abs(-dx * shape.sin + dy * shape.cos);
  if (shape.halfWidth > 0 && along >= margin && across <= shape.halfWidth - margin) return 'covered';
  const clearOfDisc = distance > shape.radius + margin;
  const clearOfStem = shape.halfWidth <= 0 || along < -margin || across > shape.halfWidth + margin;
  return clearOfDisc && clearOfStem ? 'clear' : 'edge';
}
