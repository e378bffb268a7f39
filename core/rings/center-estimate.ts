/**
 * A first estimate of the pattern centre that needs no ring radii and works when
 * a beam stop hides the centre or the centre lies outside the image.
 *
 * Idea: on a ring's flanks the intensity gradient points along the radius, so
 * the line through each edge pixel along its gradient passes (near) the centre.
 * The lines of many edge pixels are accumulated and the centre is where most of
 * them cross: a Hough-style accumulation of gradient directions (the principle of
 * the fast radial symmetry transform of G. Loy and A. Zelinsky, IEEE TPAMI 25
 * (2003) 959-973, here with lines of unlimited length, since the radius is
 * unknown).
 *
 * Steps:
 *  1. Downsample to at most workingSizePx on the long side (means over f x f
 *     blocks of unmasked pixels, f an integer) and smooth with a Gaussian of
 *     smoothingSigma coarse px (OpenCV), as a normalised convolution (blur(v w) / blur(w), w = 1 for unmasked pixels,
 *     H. Knutsson and C.-F. Westin, CVPR 1993), so masked pixels neither vote nor
 *     leak; coarse pixels whose smoothed weight is below 0.95 (near a mask) do not
 *     vote.
 *  2. Sobel gradients (OpenCV); the voterCount pixels of largest gradient
 *     magnitude (cut from a histogram) vote, each with weight 1.
 *  3. Each voter adds its full line to an accumulator that extends
 *     searchMarginFraction of the long side beyond every edge (so a centre
 *     outside the image is found), in cells of 2 x 2 coarse px; the accumulator is
 *     smoothed (sigma 1 cell) and its maximum is the coarse centre.
 *  4. Refinement: the point that minimises the sum of squared distances to the
 *     supporting lines (those passing within 4, 3, 2, then 1.5 coarse px), a
 *     2 x 2 linear solve, mapped back to full-resolution pixels.
 *  5. Significance: for a voter at distance rho from the estimate, a line of
 *     random direction passes within delta with probability (2/pi) asin(delta/rho).
 *     Summing that over voters gives the support expected by chance, E; the
 *     estimate is accepted when the observed support S (lines within delta =
 *     1.5 coarse px) satisfies S >= 3 E and S >= E + 8 sqrt(E). An image without
 *     rings or other radial structure fails this and comes back with a reason.
 * Elliptical distortion bends the normals slightly off the centre (by up to about
 * (q - 1) R / 2), but symmetrically, so the crossing stays at the centre; the
 * concentric fit later removes what is left.
 */
import type { OpenCv } from '../image/opencv-handle';
import type { Raster } from '../image/raster';
import type { PixelMask } from './pixel-mask';
import { checkMaskSize } from './mask-combine';
import { MIN_BAND_PIXELS, splitRows, type RowBand, type RowBandImages, type RowBandRunner } from './row-bands';

export interface CenterEstimateOptions {
  /** Long side of the working image, px (64-2048, default 512). */
  workingSizePx?: number;
  /** Smoothing before the gradients, coarse px (default 1.5). */
  smoothingSigma?: number;
  /** How many edge pixels vote (default 8000, at most a quarter of the usable coarse pixels). */
  voterCount?: number;
  /** How far beyond each edge the centre may be, as a fraction of the long side (0-2, default 0.5). */
  searchMarginFraction?: number;
}

export type CenterEstimate =
  | {
      ok: true;
      centerXPx: number;
      centerYPx: number;
      /**
       * Standard uncertainty of the crossing point from the scatter of the supporting lines, px.
       * Statistical only: with arcs on one side of a distorted pattern the normals miss the
       * centre by up to (q - 1) R / 2 without cancelling, so the error can be far larger.
       */
      uncertaintyPx: number;
      /** Voters whose lines pass within 1.5 coarse px of the estimate. */
      support: number;
      /** Support expected from lines of random direction. */
      chanceSupport: number;
      voterCount: number;
      /** Downsampling factor used (full px per coarse px). */
      scale: number;
    }
  | { ok: false; reason: string; support: number; chanceSupport: number; voterCount: number; scale: number };

/**
 * @param raster the image
 * @param mask excluded pixels (beam stop, saturated, hot, user polygons); optional
 * @param cv an OpenCV handle (opencv-wasm), loaded by the surface
 * @param runner runs the block sums on bands of rows (e.g. a worker pool); default this thread
 * @throws RangeError for options out of range or a mask of another size
 */
export function estimateCenter(raster: Raster, mask: PixelMask | undefined, cv: OpenCv, options: CenterEstimateOptions = {}, runner?: RowBandRunner): CenterEstimate {
  const { width, height } = raster;
  if (mask) checkMaskSize(mask, width, height);
  const workingSizePx = options.workingSizePx ?? 512;
  const smoothingSigma = options.smoothingSigma ?? 1.5;
  const margin = options.searchMarginFraction ?? 0.5;
  if (!(workingSizePx >= 64 && workingSizePx <= 2048)) throw new RangeError(`workingSizePx must be 64 to 2048; got ${workingSizePx}`);
  if (!(smoothingSigma >= 0.5 && smoothingSigma <= 10)) throw new RangeError(`smoothingSigma must be 0.5 to 10 coarse px; got ${smoothingSigma}`);
  if (!(margin >= 0 && margin <= 2)) throw new RangeError(`searchMarginFraction must be 0 to 2; got ${margin}`);
  // Integer block averaging (blocks at the right and bottom edges may be partial), on bands
  // of whole block rows so that every band's sums are exactly those of one thread.
  const f = Math.max(1, Math.ceil(Math.max(width, height) / workingSizePx));
  const cw = Math.ceil(width / f);
  const ch = Math.ceil(height / f);
  const blockSum = new Float32Array(cw * ch);
  const blockWeight = new Float32Array(cw * ch);
  const images = { raster, mask: mask ?? null };
  const plan: CenterBlockPlan = { blockPx: f };
  const count = runner ? Math.min(runner.bandCount, Math.floor((width * height) / MIN_BAND_PIXELS)) : 1;
  if (!runner || count <= 1) {
    const part = centerBlockRowsPass(images, plan, { rowStart: 0, rowEnd: height });
    blockSum.set(part.sum);
    blockWeight.set(part.weight);
  } else {
    const bands = splitRows(ch, Math.min(count, ch)).map((b) => ({ rowStart: b.rowStart * f, rowEnd: Math.min(height, b.rowEnd * f) }));
    runner.run('centerBlockSums', images, plan, bands).forEach((part, k) => {
      blockSum.set(part.sum, (bands[k]!.rowStart / f) * cw);
      blockWeight.set(part.weight, (bands[k]!.rowStart / f) * cw);
    });
  }
  const scale = f;
  for (let c = 0; c < blockSum.length; c++) {
    // Per-block means (normalised convolution then works on means with weights = usable fraction).
    const w = blockWeight[c]!;
    blockSum[c] = w > 0 ? blockSum[c]! / (f * f) : 0;
    blockWeight[c] = w / (f * f);
  }

  const mats: Array<{ delete(): void }> = [];
  const track = <T extends { delete(): void }>(m: T): T => { mats.push(m); return m; };
  let gx: Float32Array, gy: Float32Array, weight: Float32Array;
  try {
    const cv1 = track(new cv.Mat(ch, cw, cv.CV_32F));
    const cw1 = track(new cv.Mat(ch, cw, cv.CV_32F));
    (cv1.data32F as Float32Array).set(blockSum);
    (cw1.data32F as Float32Array).set(blockWeight);
    const ksize = new cv.Size(0, 0);
    cv.GaussianBlur(cv1, cv1, ksize, smoothingSigma, smoothingSigma, cv.BORDER_REFLECT);
    cv.GaussianBlur(cw1, cw1, ksize, smoothingSigma, smoothingSigma, cv.BORDER_REFLECT);
    const sv = cv1.data32F as Float32Array;
    const sw = cw1.data32F as Float32Array;
    for (let p = 0; p < sv.length; p++) sv[p] = sw[p]! > 1e-3 ? sv[p]! / sw[p]! : 0;
    const dx = track(new cv.Mat());
    const dy = track(new cv.Mat());
    cv.Sobel(cv1, dx, cv.CV_32F, 1, 0, 3, 1, 0, cv.BORDER_REFLECT);
    cv.Sobel(cv1, dy, cv.CV_32F, 0, 1, 3, 1, 0, cv.BORDER_REFLECT);
    gx = Float32Array.from(dx.data32F as Float32Array);
    gy = Float32Array.from(dy.data32F as Float32Array);
    weight = Float32Array.from(sw);
  } finally {
    for (const m of mats) m.delete();
    mats.length = 0;
  }

  // Voters: usable pixels (one in from the edge, where Sobel reflects) of largest gradient
  // magnitude; the cut is found from a histogram of the squared magnitude (no sort).
  const mag = new Float32Array(cw * ch);
  let maxMag = 0;
  let usable = 0;
  for (let y = 1; y < ch - 1; y++) {
    for (let x = 1; x < cw - 1; x++) {
      const p = y * cw + x;
      if (!(weight[p]! >= 0.95)) continue;
      const m2 = gx[p]! * gx[p]! + gy[p]! * gy[p]!;
      if (!(m2 > 0)) continue;
      mag[p] = m2;
      usable++;
      if (m2 > maxMag) maxMag = m2;
    }
  }
  const wanted = Math.min(options.voterCount ?? 8000, Math.floor(usable / 4));
  if (wanted < 50) return { ok: false, reason: 'too few unmasked pixels with any gradient to vote for a centre', support: 0, chanceSupport: 0, voterCount: 0, scale };
  const HIST = 4096;
  const hist = new Uint32Array(HIST);
  const toBin = (HIST - 1) / Math.sqrt(maxMag);
  for (let p = 0; p < mag.length; p++) if (mag[p]! > 0) hist[Math.floor(Math.sqrt(mag[p]!) * toBin)]++;
  let acc = 0, cutBin = HIST - 1;
  for (; cutBin > 0; cutBin--) { acc += hist[cutBin]!; if (acc >= wanted) break; }
  const cut = (cutBin / toBin) ** 2;
  const vx: number[] = [], vy: number[] = [], ux: number[] = [], uy: number[] = [];
  for (let p = 0; p < mag.length; p++) {
    const m2 = mag[p]!;
    if (!(m2 > 0) || m2 < cut) continue;
    const g = Math.sqrt(m2);
    vx.push(p % cw); vy.push(Math.floor(p / cw));
    ux.push(gx[p]! / g); uy.push(gy[p]! / g);
  }
  const n = vx.length;

  // Accumulator over [-M, cw + M) x [-M, ch + M) in cells of 2 x 2 coarse px (the
  // least-squares step below works on the exact lines, so the cell only has to land
  // the peak within its reach).
  const M = Math.round(margin * Math.max(cw, ch));
  const cell = 2;
  const aw = Math.ceil((cw + 2 * M) / cell), ah = Math.ceil((ch + 2 * M) / cell);
  const votes = new Float32Array(aw * ah);
  for (let k = 0; k < n; k++) drawLine(votes, aw, ah, (vx[k]! + M) / cell, (vy[k]! + M) / cell, ux[k]!, uy[k]!);
  let peak: { x: number; y: number };
  try {
    const am = track(new cv.Mat(ah, aw, cv.CV_32F));
    (am.data32F as Float32Array).set(votes);
    cv.GaussianBlur(am, am, new cv.Size(0, 0), 1, 1, cv.BORDER_CONSTANT);
    const a = am.data32F as Float32Array;
    let best = -1, pb = 0;
    for (let p = 0; p < a.length; p++) if (a[p]! > best) { best = a[p]!; pb = p; }
    peak = { x: (pb % aw) * cell - M, y: Math.floor(pb / aw) * cell - M };
  } finally {
    for (const m of mats) m.delete();
  }

  // Least-squares crossing point of the supporting lines; distance of c to line k is |(c - v_k) x u_k|.
  let c = { x: peak.x, y: peak.y };
  let residual = 0;
  let used = 0;
  let info = { sxx: 0, sxy: 0, syy: 0 };
  for (const delta of [4, 3, 2, 1.5]) {
    let sxx = 0, sxy = 0, syy = 0, bx = 0, by = 0;
    used = 0;
    for (let k = 0; k < n; k++) {
      // Normal to the line: (-uy, ux); distance d = nx (cx - vx) + ny (cy - vy).
      const nx = -uy[k]!, ny = ux[k]!;
      const d = nx * (c.x - vx[k]!) + ny * (c.y - vy[k]!);
      if (Math.abs(d) > delta) continue;
      const off = nx * vx[k]! + ny * vy[k]!;
      sxx += nx * nx; sxy += nx * ny; syy += ny * ny; bx += nx * off; by += ny * off;
      used++;
    }
    const det = sxx * syy - sxy * sxy;
    if (used < 10 || !(det > 1e-9 * (sxx + syy) ** 2)) break;
    c = { x: (syy * bx - sxy * by) / det, y: (sxx * by - sxy * bx) / det };
    info = { sxx, sxy, syy };
  }
  let support = 0, chance = 0;
  residual = 0;
  for (let k = 0; k < n; k++) {
    const rho = Math.hypot(c.x - vx[k]!, c.y - vy[k]!);
    chance += rho <= 1.5 ? 1 : (2 / Math.PI) * Math.asin(1.5 / rho);
    const d = -uy[k]! * (c.x - vx[k]!) + ux[k]! * (c.y - vy[k]!);
    if (Math.abs(d) <= 1.5) { support++; residual += d * d; }
  }
  const significant = support >= 3 * chance && support >= chance + 8 * Math.sqrt(chance);
  if (!significant) {
    return { ok: false, reason: `no centre stands out: ${support} of ${n} edge lines cross at the best point, ${chance.toFixed(0)} would by chance (no rings, or too faint)`, support, chanceSupport: chance, voterCount: n, scale };
  }
  // Uncertainty of the crossing: s^2 (N'N)^-1 with s^2 the mean squared distance of supporting lines.
  const s2 = support > 2 ? residual / (support - 2) : residual;
  const det = info.sxx * info.syy - info.sxy * info.sxy;
  const varX = det > 0 ? (s2 * info.syy) / det : Infinity;
  const varY = det > 0 ? (s2 * info.sxx) / det : Infinity;
  return {
    ok: true,
    // Coarse pixel (X, Y) covers full pixels [X f, (X+1) f), whose centre is at (X + 0.5) f - 0.5.
    centerXPx: (c.x + 0.5) * f - 0.5,
    centerYPx: (c.y + 0.5) * f - 0.5,
    uncertaintyPx: Math.sqrt(((varX + varY) * f * f) / 2),
    support,
    chanceSupport: chance,
    voterCount: n,
    scale,
  };
}

/** Adds 1 along the whole line through (x0, y0) with direction (ux, uy), split linearly between the two nearest cells across it. */
function drawLine(acc: Float32Array, aw: number, ah: number, x0: number, y0: number, ux: number, uy: number): void {
  if (Math.abs(ux) >= Math.abs(uy)) {
    const slope = uy / ux;
    for (let x = 0; x < aw; x++) {
      const y = y0 + (x - x0) * slope;
      const yi = Math.floor(y);
      if (yi < 0 || yi + 1 >= ah) continue;
      const fy = y - yi;
      acc[yi * aw + x] += 1 - fy;
      acc[(yi + 1) * aw + x] += fy;
    }
  } else {
    const slope = ux / uy;
    for (let y = 0; y < ah; y++) {
      const x = x0 + (y - y0) * slope;
      const xi = Math.floor(x);
      if (xi < 0 || xi + 1 >= aw) continue;
      const fx = x - xi;
      acc[y * aw + xi] += 1 - fx;
      acc[y * aw + xi + 1] += fx;
    }
  }
}

/** The block size of the working image (plain data for a row-band pass). */
export interface CenterBlockPlan {
  /** Full px per coarse px, f. */
  blockPx: number;
}

/**
 * Block sums of rows [rowStart, rowEnd) (rowStart a multiple of f): for each coarse
 * pixel of block rows rowStart / f .. ceil(rowEnd / f) - 1, the float32 sum of its
 * usable pixel values (unmasked, finite), added row by row, and their count.
 */
export function centerBlockRowsPass(images: RowBandImages, plan: CenterBlockPlan, band: RowBand): { sum: Float32Array; weight: Float32Array } {
  const { width, data } = images.raster;
  const ex = images.mask ? images.mask.excluded : null;
  const f = plan.blockPx;
  const cw = Math.ceil(width / f);
  const first = Math.floor(band.rowStart / f);
  const rows = Math.ceil(band.rowEnd / f) - first;
  const blockSum = new Float32Array(cw * Math.max(0, rows));
  const blockWeight = new Float32Array(cw * Math.max(0, rows));
  for (let j = band.rowStart; j < band.rowEnd; j++) {
    const crow = (Math.floor(j / f) - first) * cw;
    const row = j * width;
    for (let c0 = 0; c0 < cw; c0++) {
      const i1 = Math.min(width, (c0 + 1) * f);
      let sum = 0, count = 0;
      for (let p = row + c0 * f; p < row + i1; p++) {
        const v = data[p]!;
        // v - v is 0 for a finite value, NaN for NaN and infinities.
        if ((ex !== null && ex[p] === 1) || v - v !== 0) continue;
        sum += v;
        count++;
      }
      blockSum[crow + c0] += sum;
      blockWeight[crow + c0] += count;
    }
  }
  return { sum: blockSum, weight: blockWeight };
}
