/**
 * Points on each ring for a trial frame: where, along many azimuths, each ring's
 * radial profile peaks, to a fraction of a pixel, with an uncertainty.
 *
 * Sampling. Around ring k the annulus R_k - h_k <= R < R_k + h_k of corrected
 * radius (trial frame) is cut into wedges of about arcPx of arc (between
 * minWedges and maxWedges), and each wedge into radial bins of binPx. Every
 * unmasked pixel of the annulus adds its value to one bin of one wedge (found row
 * by row from the ellipse equation, so only annulus pixels are visited); the bin
 * records the mean value, the count and the mean corrected radius of its pixels.
 * Using each pixel once, at its own radius, avoids the smoothing and the bias of
 * interpolating a noisy image. Wedges with less than minCoverage of their pixels
 * (masks, image edges) are skipped. The cell sums are a row-band pass
 * (accumulateRingPointRows: sums over bands of rows add up), so a worker pool can
 * share them; the wedge fits below run here.
 *
 * Locating the peak. In each wedge the profile is fitted by weighted least
 * squares with a Gaussian of the ring's width sigma_k (held fixed) on a straight
 * background, y(r) = A exp(-(r - r0)^2 / 2 sigma_k^2) + c0 + c1 (r - R_k). For a
 * given r0 the model is linear in (A, c0, c1), so those are solved exactly and
 * chi^2 is minimised over r0 alone (variable projection: G. H. Golub and
 * V. Pereyra, SIAM J. Numer. Anal. 10 (1973) 413): a grid of at most sigma/1.5
 * steps, then two parabolic steps (the second over +-0.2 sigma, where chi^2 is
 * quadratic). Why this and not a centroid or a 3-point parabola: the
 * profile of a ring is symmetric about its crest, so a symmetric model fitted over
 * the whole window uses every bin with its weight, the straight background
 * removes the slope of the diffuse scattering that biases a centroid, and the
 * curvature of the profiled chi^2 gives the uncertainty: var(r0) = 2 / chi2''
 * (times the reduced chi^2 when no noise model is given). Holding the width fixed
 * takes one poorly determined parameter out of each small fit; a wrong width does
 * not move the crest of a symmetric peak. The width is re-estimated afterwards
 * from all wedges stacked on their own crests (returned as widthPx).
 * Bin weights are n_b / var(level) from the detector noise model when one is
 * given (Poisson-like noise is larger on the crest), else n_b.
 * A wedge gives a point when A > 0 with A / sigma_A >= minPointSnr and r0 lies
 * inside the window by at least half a ring width.
 */
import type { Raster } from '../image/raster';
import { levenbergMarquardt } from '../fitting/levenberg-marquardt';
import { noiseSigmaAt, type PixelNoiseModel } from './detector-noise-model';
import { checkMaskSize } from './mask-combine';
import { frameTransform, pixelAtCorrectedPolar, validateFrame, type PatternFrame } from './pattern-frame';
import type { PixelMask } from './pixel-mask';
import { runRowBands, type RowBand, type RowBandImages, type RowBandRunner } from './row-bands';

export interface RingWindow {
  /** Trial radius (corrected), px. */
  radiusPx: number;
  /** Gaussian-equivalent width of the ring's radial profile, px (> 0). */
  sigmaPx: number;
  /** Half width of the search window, px (> sigmaPx). */
  halfWindowPx: number;
}

export interface RingPointOptions {
  /** Arc length of a wedge at the ring, px (default 6). */
  arcPx?: number;
  minWedges?: number;
  maxWedges?: number;
  /** Radial bin width, px (default 0.5). */
  binPx?: number;
  /** Fraction of a wedge's pixels that must be usable (default 0.6). */
  minCoverage?: number;
  /** Peak significance a wedge needs to give a point (default 3). */
  minPointSnr?: number;
  /** Noise of one pixel against its level; when given, point sigmas are absolute. */
  noise?: PixelNoiseModel;
  /**
   * Use one pixel in stride x stride (a staggered lattice; default 1, all pixels).
   * For quick early rounds: the points get noisier by about the stride, not biased.
   */
  pixelStride?: number;
}

export interface RingPointSet {
  /** The window searched. */
  window: RingWindow;
  xPx: Float64Array;
  yPx: Float64Array;
  /** Standard uncertainty of each point along the corrected radius, px. */
  sigmaPx: Float64Array;
  azimuthRad: Float64Array;
  /** Corrected radius of each point in the trial frame, px. */
  radiusPx: Float64Array;
  /** Fitted peak height of each point, data units. */
  amplitude: Float64Array;
  wedgeCount: number;
  /** Wedges with enough usable pixels. */
  coveredWedges: number;
  /** Ring width from the stacked wedges (Gaussian sigma), px; NaN when too few points. */
  widthPx: number;
}

/**
 * @param raster the image
 * @param mask excluded pixels, or undefined
 * @param frame the trial frame
 * @param rings the windows to search, one per ring
 * @param runner runs the pixel sums on bands of rows (e.g. a worker pool); default this thread
 * @throws RangeError for a bad frame, mask size, window or option
 */
export function sampleRingPoints(raster: Raster, mask: PixelMask | undefined, frame: PatternFrame, rings: RingWindow[], options: RingPointOptions = {}, runner?: RowBandRunner): RingPointSet[] {
  validateFrame(frame);
  const { width, height } = raster;
  if (mask) checkMaskSize(mask, width, height);
  const arcPx = options.arcPx ?? 6;
  const minWedges = options.minWedges ?? 24;
  const maxWedges = options.maxWedges ?? 720;
  const binPx = options.binPx ?? 0.5;
  const minCoverage = options.minCoverage ?? 0.6;
  const minPointSnr = options.minPointSnr ?? 3;
  const stride = options.pixelStride ?? 1;
  if (!Number.isInteger(stride) || stride < 1) throw new RangeError(`pixelStride must be a positive integer; got ${stride}`);
  if (!(arcPx > 0)) throw new RangeError(`arcPx must be positive; got ${arcPx}`);
  if (!(binPx > 0)) throw new RangeError(`binPx must be positive; got ${binPx}`);
  if (!(minCoverage >= 0 && minCoverage <= 1)) throw new RangeError(`minCoverage must be in [0, 1]; got ${minCoverage}`);
  if (!Number.isInteger(minWedges) || !Number.isInteger(maxWedges) || minWedges < 4 || maxWedges < minWedges) {
    throw new RangeError(`minWedges and maxWedges must be integers with 4 <= minWedges <= maxWedges; got ${minWedges}, ${maxWedges}`);
  }
  rings.forEach((r, k) => {
    if (!(r.radiusPx > 0) || !(r.sigmaPx > 0) || !(r.halfWindowPx > r.sigmaPx) || !(r.halfWindowPx < r.radiusPx)) {
      throw new RangeError(`rings[${k}] needs radiusPx > halfWindowPx > sigmaPx > 0; got ${r.radiusPx}, ${r.halfWindowPx}, ${r.sigmaPx}`);
    }
  });
  const t = frameTransform(frame);
  // R^2 = A dx^2 + 2 B dx dy + C dy^2 (the matrix of pattern-frame.ts, det 1).
  const A = t.cos * t.cos * t.invQ + t.q * t.sin * t.sin;
  const C = t.sin * t.sin * t.invQ + t.q * t.cos * t.cos;
  const B = t.cos * t.sin * (t.invQ - t.q);
  const ringPlans: RingPointRingPlan[] = rings.map((ring) => {
    const rIn = ring.radiusPx - ring.halfWindowPx;
    const rOut = ring.radiusPx + ring.halfWindowPx;
    const nw = Math.max(minWedges, Math.min(maxWedges, Math.round((2 * Math.PI * ring.radiusPx) / arcPx)));
    const nb = Math.ceil((rOut - rIn) / binPx);
    const dyMax = rOut * Math.sqrt(A);
    const j0 = Math.max(0, Math.ceil(t.cy - dyMax)), j1 = Math.min(height - 1, Math.floor(t.cy + dyMax));
    return { rInPx: rIn, rOutPx: rOut, wedgeCount: nw, binCount: nb, rowFirst: j0, rowLast: j1 };
  });
  const plan: RingPointPlan = {
    cx: t.cx, cy: t.cy, cos: t.cos, sin: t.sin, sqrtQ: t.sqrtQ, angleRad: t.angleRad, A, B, C,
    binPx, pixelStride: stride, rings: ringPlans,
  };
  const sums = mergeRingPointSums(runRowBands(runner, 'ringPointSums', { raster, mask: mask ?? null }, plan, height, accumulateRingPointRowsPass));

  return rings.map((ring, k) => {
    const { rInPx: rIn, rOutPx: rOut, wedgeCount: nw, binCount: nb } = ringPlans[k]!;
    const { S, N, SR } = sums[k]!;
    const wScale = nw / (2 * Math.PI);

    // Expected pixel count of a full wedge: the annulus area over the wedge count.
    const fullWedge = (Math.PI * (rOut * rOut - rIn * rIn)) / nw / (stride * stride);
    const sig = ring.sigmaPx;
    const xs: number[] = [], ys: number[] = [], ss: number[] = [], az: number[] = [], rs: number[] = [], amps: number[] = [];
    const stackR: number[] = [], stackY: number[] = [];
    let covered = 0;
    const br = new Float64Array(nb), by = new Float64Array(nb), bw = new Float64Array(nb);
    for (let w = 0; w < nw; w++) {
      let count = 0, m = 0;
      for (let b = 0; b < nb; b++) {
        const n = N[w * nb + b]!;
        count += n;
        if (n === 0) continue;
        const y = S[w * nb + b]! / n;
        br[m] = SR[w * nb + b]! / n - ring.radiusPx;
        by[m] = y;
        bw[m] = options.noise ? n / noiseSigmaAt(options.noise, y) ** 2 : n;
        m++;
      }
      if (count < minCoverage * fullWedge || m < 8) continue;
      covered++;
      const fit = fitWedge(br, by, bw, m, sig, -ring.halfWindowPx + 0.5 * sig, ring.halfWindowPx - 0.5 * sig, !options.noise);
      if (!fit || !(fit.amplitude > 0) || !(fit.amplitude >= minPointSnr * fit.amplitudeSigma) || !(fit.r0Sigma > 0 && Number.isFinite(fit.r0Sigma))) continue;
      const azimuth = -Math.PI + (w + 0.5) / wScale;
      const r0 = ring.radiusPx + fit.r0;
      const pos = pixelAtCorrectedPolar(t, r0, azimuth);
      xs.push(pos.xPx); ys.push(pos.yPx); ss.push(fit.r0Sigma); az.push(azimuth); rs.push(r0); amps.push(fit.amplitude);
      for (let k = 0; k < m; k++) {
        stackR.push(br[k]! - fit.r0);
        stackY.push((by[k]! - fit.c0 - fit.c1 * br[k]!) / fit.amplitude);
      }
    }
    return {
      window: ring,
      xPx: Float64Array.from(xs), yPx: Float64Array.from(ys), sigmaPx: Float64Array.from(ss),
      azimuthRad: Float64Array.from(az), radiusPx: Float64Array.from(rs), amplitude: Float64Array.from(amps),
      wedgeCount: nw, coveredWedges: covered,
      widthPx: xs.length >= 8 ? stackedWidth(stackR, stackY, sig) : NaN,
    };
  });
}

interface WedgeFit { r0: number; r0Sigma: number; amplitude: number; amplitudeSigma: number; c0: number; c1: number }

/**
 * One wedge's data and the normal-equation entries that do not depend on r0 (basis g, 1, r):
 * summed once per wedge, each in the order a sum per trial r0 would use, so to the same value.
 */
interface WedgeData {
  r: Float64Array;
  y: Float64Array;
  w: Float64Array;
  m: number;
  inv2s2: number;
  a11: number;
  a12: number;
  a22: number;
  b1: number;
  b2: number;
  yy: number;
}

/** The linear least-squares solution for one trial r0. */
interface WedgeSolution { chi2: number; amp: number; c0: number; c1: number; varAmp: number }

/** Solves the linear part at r0 (amplitude, c0, c1 and chi^2); null when the normal matrix is singular. */
function solveWedgeAt(d: WedgeData, r0: number): WedgeSolution | null {
  const { r, y, w, m, inv2s2 } = d;
  let a00 = 0, a01 = 0, a02 = 0, b0 = 0;
  for (let k = 0; k < m; k++) {
    const g = Math.exp(-((r[k]! - r0) ** 2) * inv2s2);
    const wk = w[k]!, rk = r[k]!, yk = y[k]!;
    a00 += wk * g * g; a01 += wk * g; a02 += wk * g * rk;
    b0 += wk * g * yk;
  }
  const { b1, b2 } = d;
  const inv = inverse3(a00, a01, a02, d.a11, d.a12, d.a22);
  if (!inv) return null;
  const p0 = inv[0] * b0 + inv[1] * b1 + inv[2] * b2;
  const p1 = inv[1] * b0 + inv[3] * b1 + inv[4] * b2;
  const p2 = inv[2] * b0 + inv[4] * b1 + inv[5] * b2;
  // chi^2 = y'Wy - p'b at the linear least-squares solution.
  return { chi2: Math.max(0, d.yy - (p0 * b0 + p1 * b1 + p2 * b2)), amp: p0, c0: p1, c1: p2, varAmp: inv[0] };
}

/** Variable-projection fit of a fixed-width Gaussian on a line; r0 searched in [lo, hi] (relative to the ring radius). */
function fitWedge(r: Float64Array, y: Float64Array, w: Float64Array, m: number, sigma: number, lo: number, hi: number, scaleByChi2: boolean): WedgeFit | null {
  let a11 = 0, a12 = 0, a22 = 0, b1 = 0, b2 = 0, yy = 0;
  for (let k = 0; k < m; k++) {
    const wk = w[k]!, rk = r[k]!, yk = y[k]!;
    a11 += wk; a12 += wk * rk; a22 += wk * rk * rk;
    b1 += wk * yk; b2 += wk * rk * yk; yy += wk * yk * yk;
  }
  const data: WedgeData = { r, y, w, m, inv2s2: 1 / (2 * sigma * sigma), a11, a12, a22, b1, b2, yy };
  if (!(hi > lo)) return null;
  // Grid in steps of at most sigma/1.5 (chi^2(r0) varies on the scale of sigma), then parabolic steps.
  const steps = Math.max(6, Math.ceil((hi - lo) / (sigma / 1.5)));
  let best = Infinity, bestR = NaN;
  for (let s = 0; s <= steps; s++) {
    const r0 = lo + ((hi - lo) * s) / steps;
    const f = solveWedgeAt(data, r0);
    if (f && f.amp > 0 && f.chi2 < best) { best = f.chi2; bestR = r0; }
  }
  if (!Number.isFinite(bestR)) return null;
  // Parabola through the grid minimum and its neighbours, then one through r0 +- 0.2 sigma,
  // whose vertex is the answer and whose curvature gives the uncertainty.
  const gridStep = (hi - lo) / steps;
  let r0 = bestR;
  const gm = solveWedgeAt(data, r0 - gridStep), gp = solveWedgeAt(data, r0 + gridStep);
  if (gm && gp) {
    const curv = gm.chi2 + gp.chi2 - 2 * best;
    if (curv > 0) r0 += Math.max(-gridStep, Math.min(gridStep, (0.5 * gridStep * (gm.chi2 - gp.chi2)) / curv));
  }
  const h = 0.2 * sigma;
  const fm = solveWedgeAt(data, r0 - h), fp = solveWedgeAt(data, r0 + h);
  let f0 = solveWedgeAt(data, r0);
  if (!fm || !f0 || !fp) return null;
  const curvature = (fm.chi2 + fp.chi2 - 2 * f0.chi2) / (h * h);
  if (!(curvature > 0)) return null;
  const vertex = Math.max(-h, Math.min(h, (0.5 * h * (fm.chi2 - fp.chi2)) / (curvature * h * h)));
  if (vertex !== 0) {
    r0 += vertex;
    const fv = solveWedgeAt(data, r0);
    if (!fv) return null;
    f0 = fv;
  }
  if (r0 <= lo || r0 >= hi) return null;
  const s2 = scaleByChi2 ? f0.chi2 / Math.max(1, m - 4) : 1;
  return { r0, r0Sigma: Math.sqrt((2 / curvature) * s2), amplitude: f0.amp, amplitudeSigma: Math.sqrt(f0.varAmp * s2), c0: f0.c0, c1: f0.c1 };
}

/** Inverse of the symmetric 3 x 3 [[a, b, c], [b, d, e], [c, e, f]] as its upper triangle [00, 01, 02, 11, 12, 22]. */
function inverse3(a: number, b: number, c: number, d: number, e: number, f: number): [number, number, number, number, number, number] | null {
  const A = d * f - e * e, Bc = c * e - b * f, Cc = b * e - c * d;
  const det = a * A + b * Bc + c * Cc;
  if (!(Math.abs(det) > 1e-300) || !Number.isFinite(det)) return null;
  return [A / det, Bc / det, Cc / det, (a * f - c * c) / det, (b * c - a * e) / det, (a * d - b * b) / det];
}

/**
 * Gaussian sigma of the stacked, normalised wedge profiles: the stack is binned
 * in 0.25 px (mean per bin) and h exp(-(r - m)^2 / 2 s^2) is fitted to the bins
 * by Levenberg-Marquardt.
 */
function stackedWidth(r: number[], y: number[], start: number): number {
  if (r.length < 4) return NaN;
  let lo = Infinity, hi = -Infinity;
  for (const v of r) { if (v < lo) lo = v; if (v > hi) hi = v; }
  const bin = 0.25;
  const nb = Math.max(1, Math.ceil((hi - lo) / bin) + 1);
  const sy = new Float64Array(nb), sr = new Float64Array(nb), cnt = new Float64Array(nb);
  for (let k = 0; k < r.length; k++) {
    const b = Math.floor((r[k]! - lo) / bin);
    sy[b] += y[k]!; sr[b] += r[k]!; cnt[b]++;
  }
  const br: number[] = [], by: number[] = [], bw: number[] = [];
  for (let b = 0; b < nb; b++) if (cnt[b]! > 0) { br.push(sr[b]! / cnt[b]!); by.push(sy[b]! / cnt[b]!); bw.push(Math.sqrt(cnt[b]!)); }
  const n = br.length;
  if (n < 4) return NaN;
  const fit = levenbergMarquardt(
    {
      observationCount: n,
      parameterCount: 3,
      evaluate(p, res, jac) {
        for (let k = 0; k < n; k++) {
          const z = (br[k]! - p[1]!) / p[2]!;
          const g = Math.exp(-0.5 * z * z);
          const w = bw[k]!;
          res[k] = w * (by[k]! - p[0]! * g);
          if (jac) {
            jac[k * 3] = -w * g;
            jac[k * 3 + 1] = (-w * p[0]! * g * z) / p[2]!;
            jac[k * 3 + 2] = (-w * p[0]! * g * z * z) / p[2]!;
          }
        }
      },
    },
    [1, 0, start],
    { maxIterations: 50 },
  );
  const s = Math.abs(fit.parameters[2]!);
  return Number.isFinite(s) && s > 0 ? s : NaN;
}

/** One ring's annulus and cells in a RingPointPlan. */
export interface RingPointRingPlan {
  /** Corrected radii bounding the annulus, px: rInPx <= R < rOutPx. */
  rInPx: number;
  rOutPx: number;
  wedgeCount: number;
  /** Radial bins of binPx per wedge. */
  binCount: number;
  /** Rows the annulus can touch, inclusive. */
  rowFirst: number;
  rowLast: number;
}

/** What the pixel sums of sampleRingPoints need (plain data, the same for every band of rows). */
export interface RingPointPlan {
  /** The trial frame (pattern-frame.ts frameTransform). */
  cx: number;
  cy: number;
  cos: number;
  sin: number;
  sqrtQ: number;
  angleRad: number;
  /** R^2 = A dx^2 + 2 B dx dy + C dy^2. */
  A: number;
  B: number;
  C: number;
  binPx: number;
  pixelStride: number;
  rings: RingPointRingPlan[];
}

/** Per ring, per cell (wedge w, bin b at w x binCount + b): sum of values, pixel count, sum of corrected radii. */
export interface RingPointSums {
  S: Float64Array;
  N: Float64Array;
  SR: Float64Array;
}

/** accumulateRingPointRows in the form of a row-band pass. */
export function accumulateRingPointRowsPass(images: RowBandImages, plan: RingPointPlan, band: RowBand): RingPointSums[] {
  return accumulateRingPointRows(images.raster, images.mask, plan, band.rowStart, band.rowEnd);
}

/** Sums over disjoint bands of rows added up, cell by cell (the first part is reused as the total). */
export function mergeRingPointSums(parts: readonly RingPointSums[][]): RingPointSums[] {
  const out = parts[0]!;
  for (let p = 1; p < parts.length; p++) {
    parts[p]!.forEach((part, k) => {
      const o = out[k]!;
      for (let c = 0; c < o.S.length; c++) { o.S[c] += part.S[c]!; o.N[c] += part.N[c]!; o.SR[c] += part.SR[c]!; }
    });
  }
  return out;
}

/**
 * The cell sums of rows [rowStart, rowEnd) for every ring of `plan`: each unmasked
 * pixel of a ring's annulus (on the staggered lattice of pixelStride) adds its value,
 * 1 and its corrected radius to the cell of its wedge and radial bin. The annulus is
 * visited row by row between the columns where the ellipse equation puts its edges.
 */
export function accumulateRingPointRows(raster: Raster, mask: PixelMask | null, plan: RingPointPlan, rowStart: number, rowEnd: number): RingPointSums[] {
  const { width, data } = raster;
  const ex = mask ? mask.excluded : null;
  const { cx, cy, cos, sin, sqrtQ, angleRad, A, B, C, binPx } = plan;
  const stride = plan.pixelStride;
  const TWO_PI = 2 * Math.PI;
  return plan.rings.map((ring) => {
    const { rInPx: rIn, rOutPx: rOut, wedgeCount: nw, binCount: nb } = ring;
    const S = new Float64Array(nw * nb), N = new Float64Array(nw * nb), SR = new Float64Array(nw * nb);
    const wScale = nw / TWO_PI;
    const j0 = Math.max(ring.rowFirst, rowStart), j1 = Math.min(ring.rowLast, rowEnd - 1);
    // Pixels i0 <= i <= i1 (step stride) of row j.
    const addRun = (j: number, i0: number, i1: number) => {
      const dy = j - cy;
      for (let i = i0; i <= i1; i += stride) {
        const p = j * width + i;
        if (ex !== null && ex[p]) continue;
        const dx = i - cx;
        const R = Math.sqrt(A * dx * dx + 2 * B * dx * dy + C * dy * dy);
        if (R < rIn || R >= rOut) continue;
        const u = dx * cos + dy * sin, v = -dx * sin + dy * cos;
        let az = Math.atan2(v * sqrtQ, u / sqrtQ) + angleRad;
        if (az >= Math.PI) az -= TWO_PI; else if (az < -Math.PI) az += TWO_PI;
        const w = Math.min(nw - 1, Math.floor((az + Math.PI) * wScale));
        const b = Math.min(nb - 1, Math.floor((R - rIn) / binPx));
        const cell = w * nb + b;
        S[cell] += data[p]!; N[cell]++; SR[cell] += R;
      }
    };
    for (let j = j0; j <= j1; j++) {
      if (stride > 1 && j % stride !== 0) continue;
      const phase = stride > 1 ? (j / stride) % stride : 0;
      const dy = j - cy;
      // Columns where the ellipse of radius r crosses row j: cx + (-B dy -+ sqrt(disc)) / A.
      const discOut = B * B * dy * dy - A * (C * dy * dy - rOut * rOut);
      if (discOut < 0) continue;
      const sOut = Math.sqrt(discOut);
      // First column >= i on the row's lattice (i + ((phase - i) mod stride)).
      let lo = Math.max(0, Math.floor(cx + (-B * dy - sOut) / A) - 1);
      if (stride > 1) lo += (((phase - lo) % stride) + stride) % stride;
      const hi = Math.min(width - 1, Math.ceil(cx + (-B * dy + sOut) / A) + 1);
      const discIn = rIn > 0 ? B * B * dy * dy - A * (C * dy * dy - rIn * rIn) : -1;
      if (discIn < 0) { addRun(j, lo, hi); continue; }
      const sIn = Math.sqrt(discIn);
      const innerLo = Math.ceil(cx + (-B * dy - sIn) / A) + 1, innerHi = Math.floor(cx + (-B * dy + sIn) / A) - 1;
      addRun(j, lo, Math.min(hi, innerLo - 1));
      let start = Math.max(lo, innerHi + 1, innerLo);
      if (stride > 1) start += (((phase - start) % stride) + stride) % stride;
      addRun(j, start, hi);
    }
    return { S, N, SR };
  });
}
