/**
 * Rings found in a quick radial profile for a trial frame: the starting radii
 * and widths that ring-points.ts needs. (The measured rings come later, from the
 * radial profile and peak fits of the ring-profile modules; this is only the
 * geometry stage's own search.)
 *
 * Profile: mean of unmasked pixels in bins of binWidthPx in corrected radius
 * (nearest bin, no splitting: the bins are only a search grid), with the standard
 * error of each bin's mean from the pixels' scatter.
 * Baseline: a morphological opening (running minimum then running maximum) over
 * a window of baselineWindowPx, then a running mean over the same window: it runs
 * under peaks narrower than the window and follows broad halos (common practice
 * for a rolling-ball baseline).
 * Peaks: local maxima of (profile - baseline) over +-2 bins whose height exceeds
 * minSnr times the noise, the noise being the larger of the bin's standard error
 * and the robust scatter of the profile's second differences (1.4826 MAD / sqrt 6),
 * which also counts azimuthal variation (texture, spots) the standard error omits.
 * Width: the half width at half maximum of the excess, converted to a Gaussian
 * sigma (HWHM / sqrt(2 ln 2)).
 */
import type { Raster } from '../image/raster';
import { frameTransform, validateFrame, type PatternFrame } from './pattern-frame';
import type { PixelMask } from './pixel-mask';
import { checkMaskSize } from './mask-combine';
import { runRowBands, type RowBand, type RowBandImages, type RowBandRunner } from './row-bands';
import { medianInPlace } from './sample-median';

export interface RingCandidate {
  radiusPx: number;
  /** Gaussian-equivalent standard deviation of the ring's radial profile, px (includes any smearing by a wrong frame). */
  sigmaPx: number;
  /** Peak height above the baseline, data units. */
  height: number;
  /** Height over the noise. */
  snr: number;
}

export interface RingCandidateOptions {
  /** Smallest and largest corrected radius searched, px (default 8 and the farthest unmasked pixel). */
  minRadiusPx?: number;
  maxRadiusPx?: number;
  /** Bin width, px (default 1). */
  binWidthPx?: number;
  /** Baseline window, px (default 40). */
  baselineWindowPx?: number;
  /** Detection threshold in noise units (default 6). */
  minSnr?: number;
  /** Keep at most this many, the strongest by height x sigma (default 12). */
  maxRings?: number;
  /**
   * Use every stride-th pixel in x and y (default: the smallest stride that leaves at
   * most 1.2 million pixels, so a 2048^2 image is read at stride 2). Only a search:
   * it costs the profile a factor stride in signal-to-noise, not accuracy later.
   */
  pixelStride?: number;
  /** Runs the profile sums on bands of rows, e.g. a worker pool (default: this thread; changes only the time, and for integer data not even the rounding). */
  rowBands?: RowBandRunner;
}

export interface RingCandidateSearch {
  rings: RingCandidate[];
  /** Bin centres and the mean and baseline there (NaN where no pixel fell), for display and diagnosis. */
  profile: { radiusPx: Float64Array; mean: Float64Array; baseline: Float64Array };
  /** Set when no ring was found. */
  reason?: string;
}

/**
 * @throws RangeError for a bad frame, mask size or options
 */
export function findRingCandidates(raster: Raster, mask: PixelMask | undefined, frame: PatternFrame, options: RingCandidateOptions = {}): RingCandidateSearch {
  validateFrame(frame);
  const { width, height } = raster;
  if (mask) checkMaskSize(mask, width, height);
  const binWidthPx = options.binWidthPx ?? 1;
  const windowPx = options.baselineWindowPx ?? 40;
  const minSnr = options.minSnr ?? 6;
  const maxRings = options.maxRings ?? 12;
  if (!(binWidthPx > 0)) throw new RangeError(`binWidthPx must be positive; got ${binWidthPx}`);
  if (!(windowPx >= 3 * binWidthPx)) throw new RangeError(`baselineWindowPx must be at least 3 bins; got ${windowPx}`);
  if (!(minSnr > 0)) throw new RangeError(`minSnr must be positive; got ${minSnr}`);
  if (!Number.isInteger(maxRings) || maxRings < 1) throw new RangeError(`maxRings must be a positive integer; got ${maxRings}`);
  const stride = options.pixelStride ?? Math.max(1, Math.ceil(Math.sqrt((width * height) / 1.2e6)));
  if (!Number.isInteger(stride) || stride < 1) throw new RangeError(`pixelStride must be a positive integer; got ${options.pixelStride}`);
  const t = frameTransform(frame);
  const corners = [[0, 0], [width - 1, 0], [0, height - 1], [width - 1, height - 1]] as const;
  let rFar = 0;
  for (const [x, y] of corners) rFar = Math.max(rFar, Math.hypot(x - t.cx, y - t.cy) * t.sqrtQ);
  const rMin = options.minRadiusPx ?? 8;
  const rMax = Math.min(options.maxRadiusPx ?? rFar, rFar);
  const nb = Math.max(1, Math.ceil((rMax - rMin) / binWidthPx));
  const plan: RingCandidatePlan = { cx: t.cx, cy: t.cy, cos: t.cos, sin: t.sin, invQ: t.invQ, q: t.q, rMinPx: rMin, binWidthPx, binCount: nb, pixelStride: stride };
  const parts = runRowBands(options.rowBands, 'ringCandidateSums', { raster, mask: mask ?? null }, plan, height, ringCandidateRowsPass);
  const { sum, sum2, cnt } = parts[0]!;
  for (let k = 1; k < parts.length; k++) {
    const part = parts[k]!;
    for (let b = 0; b < nb; b++) { sum[b] += part.sum[b]!; sum2[b] += part.sum2[b]!; cnt[b] += part.cnt[b]!; }
  }
  const radiusPx = Float64Array.from({ length: nb }, (_, b) => rMin + (b + 0.5) * binWidthPx);
  const mean = new Float64Array(nb), se = new Float64Array(nb);
  for (let b = 0; b < nb; b++) {
    if (cnt[b]! < 8) { mean[b] = NaN; se[b] = NaN; continue; }
    mean[b] = sum[b]! / cnt[b]!;
    const variance = Math.max(0, sum2[b]! / cnt[b]! - mean[b]! ** 2);
    se[b] = Math.sqrt(variance / cnt[b]!);
  }
  const half = Math.max(1, Math.round(windowPx / binWidthPx / 2));
  const baseline = smoothMean(runningMax(runningMin(mean, half), half), half);
  const excess = Float64Array.from(mean, (m, b) => m - baseline[b]!);
  // Robust noise of the profile from its second differences: var(d2) = 6 var.
  const d2: number[] = [];
  for (let b = 1; b + 1 < nb; b++) {
    const v = excess[b - 1]! - 2 * excess[b]! + excess[b + 1]!;
    if (Number.isFinite(v)) d2.push(v);
  }
  const d2a = Float64Array.from(d2);
  const med = medianInPlace(Float64Array.from(d2a));
  for (let k = 0; k < d2a.length; k++) d2a[k] = Math.abs(d2a[k]! - med);
  const profileNoise = (1.4826 * medianInPlace(d2a)) / Math.sqrt(6);
  const found: RingCandidate[] = [];
  for (let b = 2; b + 2 < nb; b++) {
    const e = excess[b]!;
    if (!Number.isFinite(e) || !(e > 0)) continue;
    let isMax = true;
    for (let k = -2; k <= 2 && isMax; k++) if (k !== 0 && !(excess[b + k]! < e || (excess[b + k] === e && k > 0))) isMax = false;
    if (!isMax) continue;
    const noise = Math.max(se[b]!, profileNoise);
    if (!(e > minSnr * noise)) continue;
    // Half width at half maximum on each side, linearly interpolated.
    const hw = (dir: number): number => {
      for (let k = 1; b + dir * k >= 0 && b + dir * k < nb; k++) {
        const v = excess[b + dir * k]!;
        if (!Number.isFinite(v)) return k * binWidthPx;
        if (v <= e / 2) {
          const prev = excess[b + dir * (k - 1)]!;
          return (k - 1 + (prev - e / 2) / (prev - v)) * binWidthPx;
        }
      }
      return half * binWidthPx;
    };
    const hwhm = 0.5 * (hw(-1) + hw(1));
    // Parabola through the three bins around the maximum for a sub-bin radius.
    const l = excess[b - 1]!, r = excess[b + 1]!;
    const den = l - 2 * e + r;
    const shift = den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (l - r)) / den)) : 0;
    found.push({ radiusPx: radiusPx[b]! + shift * binWidthPx, sigmaPx: Math.max(0.5, hwhm / Math.sqrt(2 * Math.log(2))), height: e, snr: e / noise });
  }
  found.sort((a, b) => b.height * b.sigmaPx - a.height * a.sigmaPx);
  const rings = found.slice(0, maxRings).sort((a, b) => a.radiusPx - b.radiusPx);
  const result: RingCandidateSearch = { rings, profile: { radiusPx, mean, baseline } };
  if (rings.length === 0) result.reason = `no ring stands ${minSnr} noise units above the baseline between ${rMin.toFixed(0)} and ${rMax.toFixed(0)} px`;
  return result;
}

function runningMin(v: Float64Array, h: number): Float64Array {
  return Float64Array.from(v, (_, b) => {
    let m = Infinity;
    for (let k = Math.max(0, b - h); k <= Math.min(v.length - 1, b + h); k++) if (v[k]! < m) m = v[k]!;
    return m === Infinity ? NaN : m;
  });
}

function runningMax(v: Float64Array, h: number): Float64Array {
  return Float64Array.from(v, (_, b) => {
    let m = -Infinity;
    for (let k = Math.max(0, b - h); k <= Math.min(v.length - 1, b + h); k++) if (v[k]! > m) m = v[k]!;
    return m === -Infinity ? NaN : m;
  });
}

function smoothMean(v: Float64Array, h: number): Float64Array {
  return Float64Array.from(v, (_, b) => {
    let s = 0, n = 0;
    for (let k = Math.max(0, b - h); k <= Math.min(v.length - 1, b + h); k++) if (Number.isFinite(v[k]!)) { s += v[k]!; n++; }
    return n ? s / n : NaN;
  });
}

/** What the profile sums of findRingCandidates need (plain data, the same for every band of rows). */
export interface RingCandidatePlan {
  /** The trial frame (pattern-frame.ts frameTransform). */
  cx: number;
  cy: number;
  cos: number;
  sin: number;
  invQ: number;
  q: number;
  rMinPx: number;
  binWidthPx: number;
  binCount: number;
  pixelStride: number;
}

/**
 * The profile sums of rows [rowStart, rowEnd): for each bin of corrected radius, the
 * sum, the sum of squares and the count of the unmasked pixels on the staggered
 * lattice (rows j = 0 mod stride, columns from (j / stride) mod stride in steps of
 * stride). Sums over disjoint bands add up (exactly, for integer-valued images).
 */
export function ringCandidateRowsPass(images: RowBandImages, plan: RingCandidatePlan, band: RowBand): { sum: Float64Array; sum2: Float64Array; cnt: Float64Array } {
  const { width, data } = images.raster;
  const ex = images.mask ? images.mask.excluded : undefined;
  const { cx, cy, cos, sin, invQ, q, rMinPx: rMin, binCount: nb, pixelStride: stride } = plan;
  const inv = 1 / plan.binWidthPx;
  const sum = new Float64Array(nb), sum2 = new Float64Array(nb), cnt = new Float64Array(nb);
  const j0 = Math.ceil(band.rowStart / stride) * stride;
  for (let j = j0; j < band.rowEnd; j += stride) {
    const dy = j - cy;
    const row = j * width;
    for (let i = (j / stride) % stride; i < width; i += stride) {
      const p = row + i;
      if (ex !== undefined && ex[p] === 1) continue;
      const dx = i - cx;
      const u = dx * cos + dy * sin;
      const v = dy * cos - dx * sin;
      const b = Math.floor((Math.sqrt(u * u * invQ + v * v * q) - rMin) * inv);
      if (b < 0 || b >= nb) continue;
      const val = data[p]!;
      sum[b] += val; sum2[b] += val * val; cnt[b]++;
    }
  }
  return { sum, sum2, cnt };
}
