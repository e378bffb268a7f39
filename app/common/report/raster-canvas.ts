/**
 * A minimal RGBA drawing surface for the pattern image: anti-aliased strokes by
 * distance to each segment, dashes along a polyline, translucent rectangles and
 * bitmap text. Pure TypeScript; pixels are row-major RGBA, pixel (i, j) with its
 * centre at x = i, y = j as everywhere in Annula.
 */
import { GLYPH_CELL, glyphOf } from './bitmap-font';
import type { Rgb } from './palette';

export interface RgbaCanvas {
  width: number;
  height: number;
  /** width * height * 4 bytes, RGBA, alpha 255. */
  data: Uint8ClampedArray;
}

export interface Point {
  x: number;
  y: number;
}

/** A coverage layer: per pixel, how much of it a set of strokes covers (0-1). Strokes in one layer never add up. */
export interface CoverageLayer {
  width: number;
  height: number;
  coverage: Float32Array;
}

export function coverageLayer(width: number, height: number): CoverageLayer {
  return { width, height, coverage: new Float32Array(width * height) };
}

/**
 * Adds a segment of half width `halfWidthPx` to the layer: a pixel's coverage is
 * clamp(halfWidth + 0.5 - distance from its centre to the segment, 0, 1), a
 * one-pixel linear ramp at the edge (box-filter anti-aliasing).
 */
export function strokeSegment(layer: CoverageLayer, a: Point, b: Point, halfWidthPx: number): void {
  const reach = halfWidthPx + 0.5;
  const x0 = Math.max(0, Math.floor(Math.min(a.x, b.x) - reach));
  const x1 = Math.min(layer.width - 1, Math.ceil(Math.max(a.x, b.x) + reach));
  const y0 = Math.max(0, Math.floor(Math.min(a.y, b.y) - reach));
  const y1 = Math.min(layer.height - 1, Math.ceil(Math.max(a.y, b.y) + reach));
  if (x0 > x1 || y0 > y1) return;
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  const len2 = dx * dx + dy * dy;
  for (let j = y0; j <= y1; j++) {
    for (let i = x0; i <= x1; i++) {
      let t = len2 > 0 ? ((i - a.x) * dx + (j - a.y) * dy) / len2 : 0;
      t = t < 0 ? 0 : t > 1 ? 1 : t;
      const ex = i - (a.x + t * dx);
      const ey = j - (a.y + t * dy);
      const c = reach - Math.sqrt(ex * ex + ey * ey);
      if (c <= 0) continue;
      const k = j * layer.width + i;
      const v = c > 1 ? 1 : c;
      if (v > layer.coverage[k]!) layer.coverage[k] = v;
    }
  }
}

/** Strokes a polyline (closed: back to its first point). Segments wholly outside the layer cost nothing. */
export function strokePolyline(layer: CoverageLayer, points: readonly Point[], halfWidthPx: number, closed: boolean): void {
  const n = points.length;
  for (let k = 0; k + 1 < n; k++) strokeSegment(layer, points[k]!, points[k + 1]!, halfWidthPx);
  if (closed && n > 2) strokeSegment(layer, points[n - 1]!, points[0]!, halfWidthPx);
}

/**
 * The dashes of a polyline: pieces `onPx` long every `onPx + offPx` along its
 * length, starting with a dash at the first point.
 */
export function dashPolyline(points: readonly Point[], closed: boolean, onPx: number, offPx: number): Point[][] {
  if (!(onPx > 0) || !(offPx >= 0)) throw new RangeError(`dash lengths must be positive; got ${onPx} on, ${offPx} off`);
  const pts = closed && points.length > 2 ? [...points, points[0]!] : [...points];
  const period = onPx + offPx;
  const dashes: Point[][] = [];
  let current: Point[] | null = null;
  let s = 0; // arc length at the start of the segment
  for (let k = 0; k + 1 < pts.length; k++) {
    const a = pts[k]!;
    const b = pts[k + 1]!;
    const len = Math.hypot(b.x - a.x, b.y - a.y);
    if (len === 0) continue;
    // Walk the segment through the dash pattern's switch points.
    let u = 0;
    while (u < len) {
      const phase = (s + u) % period;
      const on = phase < onPx;
      const toSwitch = on ? onPx - phase : period - phase;
      const v = Math.min(len, u + toSwitch);
      if (on) {
        const p = { x: a.x + ((b.x - a.x) * u) / len, y: a.y + ((b.y - a.y) * u) / len };
        const q = { x: a.x + ((b.x - a.x) * v) / len, y: a.y + ((b.y - a.y) * v) / len };
        if (!current) {
          current = [p];
          dashes.push(current);
        }
        current.push(q);
      } else {
        current = null;
      }
      u = v + (v === u ? 1e-9 : 0);
    }
    s += len;
  }
  return dashes;
}

/** Lays `colour` over the canvas where the layer covers it, with opacity `alpha` (0-1). */
export function compositeLayer(canvas: RgbaCanvas, layer: CoverageLayer, colour: Rgb, alpha = 1): void {
  const d = canvas.data;
  const cov = layer.coverage;
  for (let k = 0; k < cov.length; k++) {
    const c = cov[k]!;
    if (c <= 0) continue;
    const a = c * alpha;
    const o = 4 * k;
    d[o] = d[o]! + (colour[0] - d[o]!) * a;
    d[o + 1] = d[o + 1]! + (colour[1] - d[o + 1]!) * a;
    d[o + 2] = d[o + 2]! + (colour[2] - d[o + 2]!) * a;
  }
}

/** Blends `colour` over the pixels of the rectangle [x0, x1) x [y0, y1) (clipped to the canvas). */
export function fillRect(canvas: RgbaCanvas, x0: number, y0: number, x1: number, y1: number, colour: Rgb, alpha = 1): void {
  const i0 = Math.max(0, Math.round(x0));
  const i1 = Math.min(canvas.width, Math.round(x1));
  const j0 = Math.max(0, Math.round(y0));
  const j1 = Math.min(canvas.height, Math.round(y1));
  const d = canvas.data;
  for (let j = j0; j < j1; j++) {
    for (let i = i0; i < i1; i++) {
      const o = 4 * (j * canvas.width + i);
      d[o] = d[o]! + (colour[0] - d[o]!) * alpha;
      d[o + 1] = d[o + 1]! + (colour[1] - d[o + 1]!) * alpha;
      d[o + 2] = d[o + 2]! + (colour[2] - d[o + 2]!) * alpha;
    }
  }
}

/** Draws `text` with its top-left corner at (x, y), each font unit `scale` pixels square. */
export function drawBitmapText(canvas: RgbaCanvas, text: string, x: number, y: number, scale: number, colour: Rgb): void {
  const s = Math.max(1, Math.round(scale));
  let penX = Math.round(x);
  const top = Math.round(y) + s; // one empty row above the glyph
  for (const ch of text) {
    const glyph = glyphOf(ch);
    glyph.forEach((row, r) =>
      row.forEach((ink, c) => {
        if (ink) fillRect(canvas, penX + c * s, top + r * s, penX + (c + 1) * s, top + (r + 1) * s, colour);
      }),
    );
    penX += GLYPH_CELL.width * s;
  }
}
