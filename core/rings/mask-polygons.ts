/**
 * User-drawn exclusion polygons, in the JSON-friendly form the app and the
 * `--mask` file use:
 *   [ { "points": [[x, y], [x, y], ...] }, ... ]
 * with x, y in pixels (pixel (i, j) has its centre at x = i, y = j).
 *
 * A pixel is excluded when its centre is inside any polygon. Inside one polygon
 * is decided by the even-odd rule (a self-crossing outline alternates inside and
 * outside, so a polygon drawn around itself twice leaves a hole). Scanline fill:
 * for the row y = j, each edge with y0 <= j < y1 (half-open in y, so a vertex on
 * the row is counted once) crosses at x; the crossings are sorted and pixels with
 * x_left <= i < x_right are filled. Centres exactly on a left edge are inside and
 * on a right edge outside (the top-left rule of rasterisers, common practice), so
 * two polygons sharing an edge never both claim or both miss a pixel.
 */
import type { PixelMask } from './pixel-mask';

export interface MaskPolygon {
  /** Vertices [x, y] in pixels, at least 3; the outline closes from the last to the first. */
  points: Array<[number, number]>;
}

/**
 * Checks an outside value (parsed JSON) and returns it as polygons.
 * @throws TypeError naming the first bad entry (e.g. "polygons[1].points[3]")
 */
export function parseMaskPolygons(value: unknown): MaskPolygon[] {
  if (!Array.isArray(value)) {
    throw new TypeError('mask polygons must be an array like [{ "points": [[x, y], ...] }]; got ' + describe(value));
  }
  return value.map((poly, k) => {
    const where = `polygons[${k}]`;
    if (typeof poly !== 'object' || poly === null || !Array.isArray((poly as { points?: unknown }).points)) {
      throw new TypeError(`${where} must be an object with "points": [[x, y], ...]; got ${describe(poly)}`);
    }
    const pts = (poly as { points: unknown[] }).points;
    if (pts.length < 3) throw new TypeError(`${where}.points needs at least 3 vertices; got ${pts.length}`);
    return {
      points: pts.map((pt, m) => {
        if (!Array.isArray(pt) || pt.length !== 2 || !pt.every((c) => typeof c === 'number' && Number.isFinite(c))) {
          throw new TypeError(`${where}.points[${m}] must be [x, y] with two finite numbers (pixels); got ${describe(pt)}`);
        }
        return [pt[0] as number, pt[1] as number] as [number, number];
      }),
    };
  });
}

/**
 * Rasterises polygons into a mask of width x height (parts outside the image are clipped).
 * @param polygons checked with parseMaskPolygons first when they come from outside
 * @throws RangeError for a non-positive or non-integer size; TypeError for bad polygons
 */
export function maskPolygons(width: number, height: number, polygons: MaskPolygon[]): PixelMask {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new RangeError(`image size must be positive integers; got ${width} x ${height}`);
  }
  const checked = parseMaskPolygons(polygons);
  const excluded = new Uint8Array(width * height);
  const crossings: number[] = [];
  for (const { points } of checked) {
    let yMin = Infinity, yMax = -Infinity;
    for (const [, y] of points) { yMin = Math.min(yMin, y); yMax = Math.max(yMax, y); }
    const j0 = Math.max(0, Math.ceil(yMin));
    const j1 = Math.min(height - 1, Math.floor(yMax));
    for (let j = j0; j <= j1; j++) {
      crossings.length = 0;
      for (let a = 0; a < points.length; a++) {
        const [xa, ya] = points[a]!;
        const [xb, yb] = points[(a + 1) % points.length]!;
        const lo = Math.min(ya, yb);
        const hi = Math.max(ya, yb);
        if (!(j >= lo && j < hi)) continue;
        crossings.push(xa + ((j - ya) * (xb - xa)) / (yb - ya));
      }
      crossings.sort((p, q) => p - q);
      for (let c = 0; c + 1 < crossings.length; c += 2) {
        const i0 = Math.max(0, Math.ceil(crossings[c]!));
        // x < x_right: the last pixel centre strictly left of the crossing.
        const i1 = Math.min(width - 1, Math.ceil(crossings[c + 1]!) - 1);
        for (let i = i0; i <= i1; i++) excluded[j * width + i] = 1;
      }
    }
  }
  return { width, height, excluded };
}

function describe(v: unknown): string {
  const s = JSON.stringify(v);
  return s === undefined ? String(v) : s.length > 60 ? s.slice(0, 57) + '...' : s;
}
