/**
 * The pattern image of a report: the camera image on a logarithmic grey scale,
 * reduced by block averaging, with what the analysis found drawn over it.
 *
 *  - grey scale: the block means are clipped between two percentiles of the
 *    unmasked blocks (default the 1st and 99.8th) and mapped by
 *    t = log(1 + 10^n x) / log(1 + 10^n), x = (v - lo) / (hi - lo) in [0, 1],
 *    a logarithmic scale spanning n decades (default 2) above the lower clip;
 *    bright-on-dark as a camera shows it, or dark-on-light for paper;
 *  - masked pixels (saturated, hot, beam stop, user regions) tinted blue, in
 *    proportion to their share of each block;
 *  - each fitted ring as its ellipse in the analysis frame (centre, axis ratio,
 *    angle; core/rings/pattern-frame.ts), amber when the best candidate indexes
 *    it, raspberry when it does not (a possible second phase), labelled as
 *    ring-labels.ts says: hkl, '(hkl)' for a tentative index, '#5' for ring 5. The ellipses leave out an open sector
 *    (default 90 degrees, where the rings are longest in view and least
 *    masked) so a reviewer sees the data themselves beside the fit;
 *  - optionally the predicted rings of a chosen phase as thin dashed cyan
 *    ellipses in that open sector, set against the data, labelled where no
 *    fitted ring lies near them (a ring the film lacks);
 *  - the centre as a cross.
 * Every overlay has a dark casing so it reads over any grey level.
 */
import type { Raster } from '../../../core/image/raster';
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';
import { frameTransform, pixelAtCorrectedPolar } from '../../../core/rings/pattern-frame';
import type { PixelMask } from '../../../core/rings/pixel-mask';
import { PALETTE, type Rgb } from './palette';
import type { ReportPredictedPhase } from './predicted-ring-radii';
import { ringLabel } from './ring-labels';
import { bitmapTextWidth, GLYPH_CELL } from './bitmap-font';
import {
  compositeLayer,
  coverageLayer,
  dashPolyline,
  drawBitmapText,
  fillRect,
  strokePolyline,
  type CoverageLayer,
  type Point,
  type RgbaCanvas,
} from './raster-canvas';

export type ImagePolarity = 'bright-on-dark' | 'dark-on-light';

export interface PatternImageOptions {
  /** Longest side of the output, px; the image is block-averaged by the smallest integer factor that fits. Default 1600. */
  maxLongSidePx?: number;
  /** The analysis mask (same size as the raster), to tint masked pixels; none: nothing tinted. */
  mask?: PixelMask | null;
  /** Default 'bright-on-dark'. */
  polarity?: ImagePolarity;
  /** Lower and upper clipping percentiles of the unmasked blocks, 0-100; default [1, 99.8]. */
  clipPercentiles?: readonly [number, number];
  /** Decades the logarithmic scale spans above the lower clip, > 0; default 2. */
  decades?: number;
  /** Predicted rings of a chosen phase (predictedRingsForReport), drawn dashed. */
  predicted?: ReportPredictedPhase | null;
  /** Draw the ring labels into the pixels (default true). The label boxes are returned either way, for a caller that draws them as text. */
  drawLabels?: boolean;
  /**
   * Angle of the open sector, degrees (0-180, default 90): a sector of the pattern, where the rings are
   * longest in view and least masked, left free of the fitted arcs so the data show, and where the predicted
   * rings are drawn. 0 draws the fitted and the predicted rings all round.
   */
  openSectorDeg?: number;
  /** Height of a label box, output px; default about 1/60 of the longest output side (at least 12). */
  labelHeightPx?: number;
  /** Width of a label's text at a box height, output px; default the bitmap font's. */
  measureLabel?: (text: string, boxHeightPx: number) => number;
}

export interface PatternImageLabel {
  text: string;
  kind: 'fitted' | 'unexplained' | 'predicted';
  /** Box, output px: top-left corner and size. */
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface PatternImage extends RgbaCanvas {
  /** Input pixels per output pixel side (1: no reduction). */
  binning: number;
  display: {
    polarity: ImagePolarity;
    percentiles: readonly [number, number];
    decades: number;
    /** The raster values at the clipping percentiles. */
    loValue: number;
    hiValue: number;
    /** One sentence for a caption. */
    description: string;
  };
  labels: PatternImageLabel[];
  /**
   * The open sector left free of fitted arcs: its middle direction in degrees from +x toward +y
   * (image y down) and its full angle; the fitted rings run round from it on the side `fittedSide`
   * (+1: increasing angle), the predicted ones on the other. Null without a centre or with openSectorDeg 0.
   */
  openSector: { angleDeg: number; widthDeg: number; fittedSide: 1 | -1 } | null;
  /** What could not be drawn and why (no centre, centre outside the image, labels left out). */
  notes: string[];
}

/** Font scale of the bitmap labels in a box `heightPx` high: the 9-unit glyph cell with a unit of margin above and below. */
function labelScale(heightPx: number): number {
  return Math.max(1, Math.floor(heightPx / 11));
}

/** Output position of input pixel coordinates (x, y): a block of b x b pixels has its centre at b i + (b - 1) / 2. */
export function toImagePixel(binning: number, xPx: number, yPx: number): Point {
  return { x: (xPx - (binning - 1) / 2) / binning, y: (yPx - (binning - 1) / 2) / binning };
}

function checkOptions(raster: Raster, o: PatternImageOptions): void {
  if (!(raster.width >= 1 && raster.height >= 1) || raster.data.length !== raster.width * raster.height) {
    throw new RangeError(`raster must hold width x height samples; got ${raster.width} x ${raster.height} with ${raster.data.length}`);
  }
  const maxSide = o.maxLongSidePx ?? 1600;
  if (!(Number.isInteger(maxSide) && maxSide >= 16)) throw new RangeError(`maxLongSidePx must be an integer >= 16; got ${maxSide}`);
  const [p0, p1] = o.clipPercentiles ?? [1, 99.8];
  if (!(p0 >= 0 && p1 <= 100 && p0 < p1)) throw new RangeError(`clipPercentiles must be two percentiles 0 <= low < high <= 100; got [${p0}, ${p1}]`);
  if (o.decades !== undefined && !(o.decades > 0 && o.decades <= 12)) throw new RangeError(`decades must be in (0, 12]; got ${o.decades}`);
  if (o.mask && (o.mask.width !== raster.width || o.mask.height !== raster.height)) {
    throw new RangeError(`mask is ${o.mask.width} x ${o.mask.height} but the raster is ${raster.width} x ${raster.height}`);
  }
}

interface Blocks {
  width: number;
  height: number;
  /** Mean of the valid (unmasked, finite) pixels of each block, or of all its finite pixels when none is valid. */
  mean: Float64Array;
  /** Share of each block's pixels that are masked or not finite. */
  maskedFraction: Float32Array;
  /** Whether a block had any valid pixel. */
  valid: Uint8Array;
}

function blockAverage(raster: Raster, mask: PixelMask | null, b: number): Blocks {
  const width = Math.ceil(raster.width / b);
  const height = Math.ceil(raster.height / b);
  const n = width * height;
  const sumValid = new Float64Array(n);
  const countValid = new Uint32Array(n);
  const sumAll = new Float64Array(n);
  const countAll = new Uint32Array(n);
  const total = new Uint32Array(n);
  const excluded = mask?.excluded;
  for (let j = 0; j < raster.height; j++) {
    const row = ((j / b) | 0) * width;
    for (let i = 0; i < raster.width; i++) {
      const k = row + ((i / b) | 0);
      const p = j * raster.width + i;
      const v = raster.data[p]!;
      total[k]!++;
      if (!Number.isFinite(v)) continue;
      sumAll[k]! += v;
      countAll[k]!++;
      if (excluded && excluded[p]) continue;
      sumValid[k]! += v;
      countValid[k]!++;
    }
  }
  const mean = new Float64Array(n);
  const maskedFraction = new Float32Array(n);
  const valid = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    valid[k] = countValid[k]! > 0 ? 1 : 0;
    mean[k] = countValid[k]! > 0 ? sumValid[k]! / countValid[k]! : countAll[k]! > 0 ? sumAll[k]! / countAll[k]! : Number.NaN;
    maskedFraction[k] = 1 - countValid[k]! / total[k]!;
  }
  return { width, height, mean, maskedFraction, valid };
}

/** Percentiles (0-100) of the valid block means, from at most about 200 000 of them taken at a regular stride. */
function percentiles(blocks: Blocks, ps: readonly number[]): number[] {
  let count = 0;
  for (let k = 0; k < blocks.valid.length; k++) if (blocks.valid[k]) count++;
  if (count === 0) return ps.map(() => Number.NaN);
  const stride = Math.max(1, Math.ceil(count / 200_000));
  const sample: number[] = [];
  let seen = 0;
  for (let k = 0; k < blocks.valid.length; k++) {
    if (!blocks.valid[k]) continue;
    if (seen++ % stride === 0) sample.push(blocks.mean[k]!);
  }
  const sorted = Float64Array.from(sample).sort();
  return ps.map((p) => sorted[Math.round((p / 100) * (sorted.length - 1))]!);
}

/** 1 -> '1st', 99.8 -> '99.8th'. */
function ordinal(p: number): string {
  if (!Number.isInteger(p)) return `${p}th`;
  const teen = p % 100 >= 11 && p % 100 <= 13;
  return `${p}${teen ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[p % 10] ?? 'th'}`;
}

function formatValue(v: number): string {
  const a = Math.abs(v);
  return a !== 0 && (a >= 1e6 || a < 1e-2) ? v.toExponential(2) : String(Number(v.toPrecision(4)));
}

/** Points of the ellipse of corrected radius `radiusPx` in the frame, in output pixels, about every 3 output px. */
function ellipsePoints(result: AnalysisResult, radiusPx: number, binning: number): Point[] {
  const t = frameTransform({ centerXPx: result.center.xPx, centerYPx: result.center.yPx, axisRatio: Math.max(1, result.distortion.axisRatio), angleDeg: result.distortion.angleDeg });
  const n = Math.max(64, Math.min(8192, Math.ceil((2 * Math.PI * radiusPx) / binning / 3)));
  const pts: Point[] = [];
  for (let k = 0; k < n; k++) {
    const p = pixelAtCorrectedPolar(t, radiusPx, (2 * Math.PI * k) / n);
    pts.push(toImagePixel(binning, p.xPx, p.yPx));
  }
  return pts;
}

/** Length, output px, of the ray from `c` at `angle` that lies inside the image on blocks mostly unmasked. */
function unmaskedRayLength(blocks: Blocks, c: Point, angle: number): number {
  const dx = Math.cos(angle);
  const dy = Math.sin(angle);
  const maxLen = Math.hypot(blocks.width, blocks.height) + Math.hypot(c.x, c.y) + Math.hypot(c.x - blocks.width, c.y - blocks.height);
  let len = 0;
  for (let s = 0; s < maxLen; s += 2) {
    const i = Math.round(c.x + dx * s);
    const j = Math.round(c.y + dy * s);
    if (i < 0 || j < 0 || i >= blocks.width || j >= blocks.height) continue;
    if (blocks.maskedFraction[j * blocks.width + i]! < 0.5) len += 2;
  }
  return len;
}

/**
 * The runs of a closed loop of points where `keep` holds, as polylines; the
 * whole loop (closed) when it holds everywhere.
 */
function runs(points: readonly Point[], keep: (p: Point) => boolean): Array<{ points: Point[]; closed: boolean }> {
  const n = points.length;
  if (n === 0) return [];
  const flags = points.map(keep);
  if (flags.every(Boolean)) return [{ points: [...points], closed: true }];
  const start = flags.indexOf(false);
  const out: Array<{ points: Point[]; closed: boolean }> = [];
  let current: Point[] | null = null;
  for (let m = 1; m <= n; m++) {
    const k = (start + m) % n;
    if (flags[k]) {
      if (!current) {
        current = [];
        out.push({ points: current, closed: false });
      }
      current.push(points[k]!);
    } else {
      current = null;
    }
  }
  return out.filter((r) => r.points.length > 1);
}

interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

const overlaps = (a: Box, b: Box, margin: number): boolean =>
  a.x < b.x + b.width + margin && b.x < a.x + a.width + margin && a.y < b.y + b.height + margin && b.y < a.y + a.height + margin;

/**
 * Renders the pattern of `result` from its `raster`.
 * @param raster the image the analysis measured (same size as result.image)
 * @throws RangeError for a raster or mask of the wrong size and malformed options
 */
export function renderPatternImage(raster: Raster, result: AnalysisResult, options: PatternImageOptions = {}): PatternImage {
  checkOptions(raster, options);
  if (result.image.width !== raster.width || result.image.height !== raster.height) {
    throw new RangeError(`raster is ${raster.width} x ${raster.height} but the analysis was of a ${result.image.width} x ${result.image.height} image`);
  }
  const maxSide = options.maxLongSidePx ?? 1600;
  const binning = Math.max(1, Math.ceil(Math.max(raster.width, raster.height) / maxSide));
  const blocks = blockAverage(raster, options.mask ?? null, binning);
  const { width, height } = blocks;
  const polarity = options.polarity ?? 'bright-on-dark';
  const pct = options.clipPercentiles ?? ([1, 99.8] as const);
  const decades = options.decades ?? 2;
  let [lo, hi] = percentiles(blocks, pct);
  if (!Number.isFinite(lo!)) [lo, hi] = [0, 1];
  if (!(hi! > lo!)) hi = lo! + 1;
  const gain = 10 ** decades;
  const norm = Math.log1p(gain);

  const data = new Uint8ClampedArray(width * height * 4);
  const tint = PALETTE.mask.onImage;
  for (let k = 0; k < width * height; k++) {
    const v = blocks.mean[k]!;
    let x = Number.isFinite(v) ? (v - lo!) / (hi! - lo!) : 0;
    x = x < 0 ? 0 : x > 1 ? 1 : x;
    const t = Math.log1p(gain * x) / norm;
    let g = 255 * (polarity === 'bright-on-dark' ? t : 1 - t);
    const o = 4 * k;
    const m = blocks.maskedFraction[k]! * 0.55;
    data[o] = g + (tint[0] - g) * m;
    data[o + 1] = g + (tint[1] - g) * m;
    data[o + 2] = (g = g + (tint[2] - g) * m);
    data[o + 3] = 255;
  }
  const canvas: RgbaCanvas = { width, height, data };
  const reduction = binning > 1 ? `, block-averaged ${binning} x ${binning}` : '';
  const description =
    `Logarithmic grey scale over ${decades} decades from the ${ordinal(pct[0])} to the ${ordinal(pct[1])} percentile of the unmasked pixels ` +
    `(${formatValue(lo!)} to ${formatValue(hi!)}), ${polarity === 'bright-on-dark' ? 'bright' : 'dark'} is more intense${reduction}.`;
  const notes: string[] = [];
  const labels: PatternImageLabel[] = [];
  const image: PatternImage = { ...canvas, binning, display: { polarity, percentiles: pct, decades, loValue: lo!, hiValue: hi!, description }, labels, openSector: null, notes };

  const { xPx, yPx } = result.center;
  if (!Number.isFinite(xPx) || !Number.isFinite(yPx)) {
    notes.push('no pattern centre was found, so no rings are drawn');
    return image;
  }

  const long = Math.max(width, height);
  const line = Math.max(0.9, long / 750); // half width of a fitted ring
  const casing = Math.max(1, long / 1000);
  const thin = Math.max(0.6, long / 1600);
  const layer = (): CoverageLayer => coverageLayer(width, height);
  const c = toImagePixel(binning, xPx, yPx);

  // The open sector: where the rings are longest in view and least masked, left free of the
  // fitted arcs so the data show; the predicted rings are drawn there, dashed, against them.
  const openHalf = (Math.max(0, Math.min(180, options.openSectorDeg ?? 90)) * Math.PI) / 360;
  const viewAngles = Array.from({ length: 24 }, (_, k) => (k * Math.PI) / 12);
  const viewLength = viewAngles.map((a) => unmaskedRayLength(blocks, c, a));
  const angleGap = (a: number, b: number): number => Math.abs(Math.atan2(Math.sin(a - b), Math.cos(a - b)));
  const openAngle = viewAngles[viewLength.indexOf(Math.max(...viewLength))]!;
  // Round from the open sector: the fitted arcs on one side, the predicted rings' dashes on the
  // other (each side gets the whole ring when the other has nothing to show).
  const predicted = options.predicted?.rings ?? [];
  const rel = (p: Point): number => Math.atan2(Math.sin(Math.atan2(p.y - c.y, p.x - c.x) - openAngle), Math.cos(Math.atan2(p.y - c.y, p.x - c.x) - openAngle));
  // The fitted rings take the side whose middle has the longer view (their labels go there).
  const middle = (openHalf + Math.PI) / 2;
  const side: 1 | -1 = unmaskedRayLength(blocks, c, openAngle + middle) >= unmaskedRayLength(blocks, c, openAngle - middle) ? 1 : -1;
  const offset = (p: Point): number => side * rel(p);
  if (openHalf > 0) image.openSector = { angleDeg: (openAngle * 180) / Math.PI, widthDeg: (openHalf * 360) / Math.PI, fittedSide: side };
  const isOpen = (p: Point): boolean => openHalf > 0 && Math.abs(offset(p)) < openHalf;
  const split = predicted.length > 0;
  const inFitted = (p: Point): boolean => !isOpen(p) && (!split || offset(p) >= 0);
  const inPredicted = (p: Point): boolean => !isOpen(p) && offset(p) < 0;
  const fittedLabelAngle = openAngle + side * (split ? middle : Math.PI);
  const predictedLabelAngle = openAngle - side * middle;

  // Fitted rings outside the open sector: casing, then colour (indexed and unexplained apart).
  const ringPts = result.rings.map((r) => (Number.isFinite(r.radiusPx) && r.radiusPx > 0 ? ellipsePoints(result, r.radiusPx, binning) : []));
  const fitCasing = layer();
  const fitIndexed = layer();
  const fitUnexplained = layer();
  const labelsOfRings = result.rings.map((_, i) => ringLabel(result, i));
  result.rings.forEach((_, i) => {
    for (const arc of runs(ringPts[i]!, inFitted)) {
      strokePolyline(fitCasing, arc.points, line + casing, arc.closed);
      strokePolyline(labelsOfRings[i]!.explained ? fitIndexed : fitUnexplained, arc.points, line, arc.closed);
    }
  });
  compositeLayer(canvas, fitCasing, PALETTE.casing, 0.85);
  compositeLayer(canvas, fitIndexed, PALETTE.fittedRing.onImage);
  compositeLayer(canvas, fitUnexplained, PALETTE.unexplainedRing.onImage);

  // Predicted rings: thin dashes, each with its own casing.
  const predictedPts = predicted.map((p) => ellipsePoints(result, p.radiusPx, binning));
  if (predicted.length > 0) {
    const pCasing = layer();
    const pColour = layer();
    for (const pts of predictedPts) {
      for (const arc of runs(pts, inPredicted)) {
        for (const d of dashPolyline(arc.points, arc.closed, Math.max(5, long / 130), Math.max(4, long / 190))) {
          strokePolyline(pCasing, d, thin + casing * 0.8, false);
          strokePolyline(pColour, d, thin, false);
        }
      }
    }
    compositeLayer(canvas, pCasing, PALETTE.casing, 0.8);
    compositeLayer(canvas, pColour, PALETTE.predictedRing.onImage);
  }

  // The centre: a cross with a gap, so the exact point stays visible.
  const arm = Math.max(8, long / 45);
  const gap = arm * 0.35;
  const centreBox: Box = { x: c.x - arm, y: c.y - arm, width: 2 * arm, height: 2 * arm };
  if (c.x < -0.5 || c.y < -0.5 || c.x > width - 0.5 || c.y > height - 0.5) {
    notes.push(`the pattern centre (${xPx.toFixed(1)}, ${yPx.toFixed(1)}) px lies outside the image`);
  } else {
    const cCasing = layer();
    const cColour = layer();
    for (const [dx, dy] of [[1, 0], [-1, 0], [0, 1], [0, -1]] as const) {
      const a = { x: c.x + dx * gap, y: c.y + dy * gap };
      const b = { x: c.x + dx * arm, y: c.y + dy * arm };
      strokePolyline(cCasing, [a, b], line + casing, false);
      strokePolyline(cColour, [a, b], line, false);
    }
    compositeLayer(canvas, cCasing, PALETTE.casing, 0.85);
    compositeLayer(canvas, cColour, PALETTE.centre.onImage);
  }

  // Labels just outside their ring, in the middle of its side, stepping round the ring until one
  // overlaps no other label and lies inside the image.
  const labelH = options.labelHeightPx ?? 11 * Math.max(1, Math.round(long / 600));
  const measure = options.measureLabel ?? ((text: string, h: number) => bitmapTextWidth(text, labelScale(h)));
  const pad = Math.max(2, Math.round(labelH * 0.2));
  const placed: Box[] = [centreBox];
  let omitted = 0;
  const place = (text: string, kind: PatternImageLabel['kind'], pts: Point[], around: number, inside: (p: Point) => boolean): void => {
    const w = Math.ceil(measure(text, labelH) + 2 * pad);
    const h = labelH;
    // Outside the ring at every angle first; inside it only when no outside place is free.
    for (const outward of [1, -1]) {
      for (let step = 0; step <= 40; step++) {
        const k = step === 0 ? 0 : (step % 2 === 1 ? 1 : -1) * Math.ceil(step / 2);
        const angle = around + (k * 6 * Math.PI) / 180;
        // The ring's point nearest that direction.
        let best = pts[0]!;
        let bestGap = Infinity;
        for (const p of pts) {
          const g = angleGap(Math.atan2(p.y - c.y, p.x - c.x), angle);
          if (g < bestGap) [bestGap, best] = [g, p];
        }
        if (!inside(best)) continue;
        const len = Math.hypot(best.x - c.x, best.y - c.y) || 1;
        const ux = (outward * (best.x - c.x)) / len;
        const uy = (outward * (best.y - c.y)) / len;
        const reach = line + casing + 2 + (Math.abs(ux) * w + Math.abs(uy) * h) / 2;
        const box: Box = { x: best.x + ux * reach - w / 2, y: best.y + uy * reach - h / 2, width: w, height: h };
        if (box.x < 1 || box.y < 1 || box.x + w > width - 1 || box.y + h > height - 1) continue;
        if (placed.some((b) => overlaps(b, box, 2))) continue;
        placed.push(box);
        labels.push({ text, kind, ...box });
        return;
      }
    }
    omitted++;
  };
  labelsOfRings.forEach((l, i) => {
    if (ringPts[i]!.length > 0) place(l.text, l.explained ? 'fitted' : 'unexplained', ringPts[i]!, fittedLabelAngle, inFitted);
  });
  const fittedRadii = result.rings.filter((r) => Number.isFinite(r.radiusPx) && r.radiusPx > 0);
  predicted.forEach((p, k) => {
    const near = fittedRadii.some((r) => Math.abs(r.radiusPx - p.radiusPx) <= Math.max(3 * binning, 1.5 * r.fwhmPx));
    if (!near) place(p.label.split('/')[0]!, 'predicted', predictedPts[k]!, predictedLabelAngle, inPredicted);
  });
  if (omitted > 0) notes.push(`${omitted} ring label${omitted === 1 ? '' : 's'} left out for lack of room`);

  if (options.drawLabels ?? true) {
    for (const l of labels) {
      const colour: Rgb = l.kind === 'fitted' ? PALETTE.fittedRing.onImage : l.kind === 'unexplained' ? PALETTE.unexplainedRing.onImage : PALETTE.predictedRing.onImage;
      fillRect(canvas, l.x, l.y, l.x + l.width, l.y + l.height, PALETTE.casing, 0.78);
      const s = labelScale(l.height);
      const tw = bitmapTextWidth(l.text, s);
      drawBitmapText(canvas, l.text, l.x + (l.width - tw) / 2, l.y + (l.height - GLYPH_CELL.height * s) / 2, s, colour);
    }
  }
  return image;
}
