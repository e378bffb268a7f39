/**
 * The geometry of a ring pattern, end to end: a first centre, the rings of a
 * quick radial profile, ring points along many azimuths, the concentric ellipse
 * fit, and round again with the better frame until the centre stops moving.
 *
 *   1. Start: options.start (e.g. a centre the user dragged), else
 *      estimateCenter (center-estimate.ts), round.
 *   2. Rings: findRingCandidates (ring-candidates.ts) in that frame.
 *   3. Iterate: sampleRingPoints (ring-points.ts) in windows around each ring,
 *      then fitConcentricEllipses (concentric-ellipse-fit.ts) over all rings.
 *      The first round fits concentric circles (the start may be pixels off, and
 *      q is poorly defined from smeared points); later rounds fit the
 *      distortion. Windows are re-centred on the fitted radii and narrowed to
 *      the measured ring widths (plus twice the last centre shift). Once the centre
 *      moves by less than 1 px, the rings are searched again in the new frame
 *      (weak rings smeared out by the first centre then appear) and new ones are
 *      added. Converged when the centre moves by less than tolerancePx and q by
 *      less than 1e-5 in a round with distortion (the points are located in each
 *      wedge's own radial profile, so they barely depend on the trial frame once
 *      the windows hold the rings: usually three rounds suffice).
 *   4. Each ring's kept points also get their own direct ellipse fit
 *      (ellipse-fit.ts) and a single-ring geometric fit with uncertainties,
 *      so the per-ring ellipses can be compared with the common model.
 * Cannot-fit cases (no centre, no rings, too few points) come back as
 * { ok: false, reason } with whatever was learnt, never as a throw.
 */
import type { OpenCv } from '../image/opencv-handle';
import type { Raster } from '../image/raster';
import { estimateCenter, type CenterEstimate, type CenterEstimateOptions } from './center-estimate';
import { fitConcentricEllipses, type FrameSigma, type RingPointList } from './concentric-ellipse-fit';
import type { EllipseGeometry } from './conic-ellipse';
import { estimatePixelNoise, type PixelNoiseModel } from './detector-noise-model';
import { fitEllipseDirect } from './ellipse-fit';
import { checkMaskSize } from './mask-combine';
import { roundFrame, validateFrame, type PatternFrame } from './pattern-frame';
import type { PixelMask } from './pixel-mask';
import { findRingCandidates, type RingCandidate } from './ring-candidates';
import { sampleRingPoints, type RingPointOptions, type RingWindow } from './ring-points';
import type { RowBandRunner } from './row-bands';

export interface RefineFrameOptions {
  /** Start from this frame instead of the first estimate (no OpenCV needed then). */
  start?: PatternFrame;
  centerEstimate?: CenterEstimateOptions;
  /** Fit axis ratio and angle (default true). */
  fitDistortion?: boolean;
  /** Most rings to use (default 12; the strongest). */
  maxRings?: number;
  minRadiusPx?: number;
  maxRadiusPx?: number;
  /** Detection threshold of the ring search, noise units (default 6). */
  minRingSnr?: number;
  /** Rounds of points-and-fit (default 8). */
  maxIterations?: number;
  /** Stop when the centre moves less than this, px (default 0.01; the points hardly depend on the trial frame once the windows hold the rings, so later rounds change little). */
  tolerancePx?: number;
  /** Pixel noise model; default estimated from the image (null: none, point sigmas from each wedge's own scatter). */
  noise?: PixelNoiseModel | null;
  ringPoints?: Omit<RingPointOptions, 'noise'>;
  /** Trim rule of the concentric fit (default 3.5 robust sigmas). */
  rejectSigmas?: number;
  /** Runs the pixel sums of the centre estimate, the ring search and the ring points on bands of rows, e.g. a worker pool (default: this thread; changes only the time). */
  rowBands?: RowBandRunner;
}

export interface RefinedRing {
  /** Corrected radius (geometric mean of the semi-axes) in the common frame, px. */
  radiusPx: number;
  /** From the concentric fit's covariance, scaled by its reduced chi-square. */
  radiusSigmaPx: number;
  /** Gaussian sigma of the ring's radial profile, px. */
  widthPx: number;
  /** Points found, and kept by the trim rule. */
  pointCount: number;
  keptCount: number;
  /** Fraction of the ring's wedges that gave a point. */
  coverage: number;
  /** Direct least-squares ellipse (Halir-Flusser) of the kept points; null when it failed. */
  ellipse: EllipseGeometry | null;
  /** Single-ring geometric fit (centre, q, angle of this ring alone) with uncertainties; null when it failed. */
  ownFrame: { frame: PatternFrame; sigma: FrameSigma; radiusPx: number; radiusSigmaPx: number } | null;
  /** The kept and trimmed points, for display. */
  points: { xPx: Float64Array; yPx: Float64Array; sigmaPx: Float64Array; kept: Uint8Array };
}

export type FrameRefinement =
  | {
      ok: true;
      frame: PatternFrame;
      /** Standard uncertainties (covariance scaled by the reduced chi-square). */
      sigma: FrameSigma;
      rings: RefinedRing[];
      iterations: number;
      converged: boolean;
      reducedChiSquare: number;
      rmsResidualPx: number;
      firstEstimate: CenterEstimate | null;
      warnings: string[];
    }
  | { ok: false; reason: string; frame: PatternFrame | null; firstEstimate: CenterEstimate | null; warnings: string[] };

/**
 * @param raster the image
 * @param mask excluded pixels (combine saturated, hot, beam stop and polygons first), or undefined
 * @param options see RefineFrameOptions
 * @param cv an OpenCV handle; needed only when options.start is not given
 * @throws RangeError for bad options, a mask of another size, or no start and no OpenCV
 */
export function refineFrame(raster: Raster, mask: PixelMask | undefined, options: RefineFrameOptions = {}, cv?: OpenCv): FrameRefinement {
  if (mask) checkMaskSize(mask, raster.width, raster.height);
  const fitDistortion = options.fitDistortion ?? true;
  const maxRings = options.maxRings ?? 12;
  const maxIterations = options.maxIterations ?? 8;
  const tolerancePx = options.tolerancePx ?? 0.01;
  if (!Number.isInteger(maxIterations) || maxIterations < 1) throw new RangeError(`maxIterations must be a positive integer; got ${maxIterations}`);
  if (!(tolerancePx > 0)) throw new RangeError(`tolerancePx must be positive; got ${tolerancePx}`);
  const warnings: string[] = [];

  let firstEstimate: CenterEstimate | null = null;
  let frame: PatternFrame;
  if (options.start) {
    validateFrame(options.start);
    frame = { ...options.start };
  } else {
    if (!cv) throw new RangeError('refineFrame needs an OpenCV handle (cv) for the first centre estimate, or options.start');
    firstEstimate = estimateCenter(raster, mask, cv, options.centerEstimate, options.rowBands);
    if (!firstEstimate.ok) return { ok: false, reason: firstEstimate.reason, frame: null, firstEstimate, warnings };
    frame = roundFrame(firstEstimate.centerXPx, firstEstimate.centerYPx);
  }
  const noise = options.noise === undefined ? estimatePixelNoise(raster, mask) : options.noise ?? undefined;
  const usableNoise = noise && noise.pairCount >= 48 ? noise : undefined;
  const search = (f: PatternFrame) => findRingCandidates(raster, mask, f, { maxRings, minRadiusPx: options.minRadiusPx, maxRadiusPx: options.maxRadiusPx, minSnr: options.minRingSnr, rowBands: options.rowBands });
  const found = search(frame);
  if (found.rings.length === 0) return { ok: false, reason: found.reason ?? 'no rings found', frame, firstEstimate, warnings };

  // Until the distortion is known, a ring seen in a round frame spreads over R (1 +- (q - 1)/2)
  // and may show two horns: merge candidates closer than 3.5 % of the radius (q up to 1.035).
  let rings = fitDistortion ? mergeClose(found.rings, 0.035) : found.rings.map((c) => ({ radiusPx: c.radiusPx, sigmaPx: c.sigmaPx }));
  let shift = Infinity;
  let lastShift = firstEstimate ? 3 * Math.max(1, firstEstimate.scale) : 2;
  let converged = false;
  let researches = 0;
  let iterations = 0;
  let last: {
    fit: Extract<ReturnType<typeof fitConcentricEllipses>, { ok: true }>;
    sets: ReturnType<typeof sampleRingPoints>;
    used: number[];
  } | null = null;
  for (let iter = 0; iter < maxIterations; iter++) {
    iterations = iter + 1;
    const windows = makeWindows(rings, lastShift);
    // Early rounds (ring list not settled, or the centre still moving by more than 0.2 px)
    // read a staggered half or quarter of the pixels of a large image and fewer wedges.
    const quick = researches < 3 || shift > 0.2;
    const quickStride = Math.max(1, Math.min(3, Math.round(Math.sqrt((raster.width * raster.height) / 1.5e6))));
    const sampling: RingPointOptions = quick ? { maxWedges: 240, binPx: 1, ...options.ringPoints, pixelStride: quickStride } : { ...options.ringPoints };
    const sets = sampleRingPoints(raster, mask, frame, windows.map((w) => w.window), { ...sampling, noise: usableNoise }, options.rowBands);
    const used: number[] = [];
    sets.forEach((s, k) => { if (s.xPx.length >= 8) used.push(k); });
    if (used.length === 0) {
      return { ok: false, reason: 'no ring gave enough points along its circumference (too faint, too short an arc, or hidden by the mask)', frame, firstEstimate, warnings };
    }
    const distortionNow = fitDistortion && iter > 0;
    const lists: RingPointList[] = used.map((k) => ({ xPx: sets[k]!.xPx, yPx: sets[k]!.yPx, sigmaPx: sets[k]!.sigmaPx }));
    const fit = fitConcentricEllipses(lists, { start: frame, fitDistortion: distortionNow, rejectSigmas: options.rejectSigmas });
    if (!fit.ok) return { ok: false, reason: fit.reason, frame, firstEstimate, warnings };
    shift = Math.hypot(fit.frame.centerXPx - frame.centerXPx, fit.frame.centerYPx - frame.centerYPx);
    const dq = Math.abs(fit.frame.axisRatio - frame.axisRatio);
    frame = fit.frame;
    lastShift = shift;
    last = { fit, sets, used };
    // Next windows: fitted radii and measured widths.
    const next = used.map((k, u) => ({ radiusPx: fit.radiiPx[u]!, sigmaPx: Number.isFinite(sets[k]!.widthPx) ? Math.max(0.5, sets[k]!.widthPx) : rings[k]!.sigmaPx }));
    // Search the rings again in the better frame (with the distortion once it is fitted, so
    // merged horns separate and weak rings smeared by the first frame appear), until the
    // list stops changing (at most 3 times).
    if (researches < 3 && (distortionNow || !fitDistortion) && shift < 1) {
      researches++;
      const again = search(frame).rings;
      const stable = again.length === next.length && again.every((c) => next.some((r) => Math.abs(r.radiusPx - c.radiusPx) < Math.max(r.sigmaPx, 1)));
      if (!stable) {
        rings = again.map((c) => next.find((r) => Math.abs(r.radiusPx - c.radiusPx) < Math.max(r.sigmaPx, 1)) ?? { radiusPx: c.radiusPx, sigmaPx: c.sigmaPx });
        continue;
      }
      researches = 3;
    }
    rings = next;
    if (!quick && distortionNow === fitDistortion && shift < tolerancePx && dq < 1e-5) { converged = true; break; }
  }
  if (!last) return { ok: false, reason: 'no fit', frame, firstEstimate, warnings };
  const { fit, sets, used } = last;
  if (!converged) warnings.push(`the frame had not settled after ${iterations} rounds (last centre shift ${shift.toFixed(4)} px)`);
  const dropped = sets.length - used.length;
  if (dropped > 0) warnings.push(`${dropped} ring(s) gave fewer than 8 points and were left out of the fit`);
  if (fitDistortion && !Number.isFinite(fit.sigma.angleDeg)) warnings.push('the axis ratio is not distinguishable from 1: the major-axis angle is undetermined');
  if (fit.reducedChiSquare > 4) warnings.push(`the ring points scatter ${Math.sqrt(fit.reducedChiSquare).toFixed(1)}x more than their uncertainties (texture, spots or a distortion the model lacks); uncertainties are scaled up accordingly`);
  if (frame.centerXPx < 0 || frame.centerYPx < 0 || frame.centerXPx > raster.width - 1 || frame.centerYPx > raster.height - 1) {
    warnings.push('the pattern centre lies outside the image: only arcs were measured');
  }
  const out: RefinedRing[] = used.map((k, u) => {
    const s = sets[k]!;
    const kept = fit.kept[u]!;
    const kx: number[] = [], ky: number[] = [], ks: number[] = [];
    for (let i = 0; i < kept.length; i++) if (kept[i]) { kx.push(s.xPx[i]!); ky.push(s.yPx[i]!); ks.push(s.sigmaPx[i]!); }
    const direct = fitEllipseDirect(kx, ky);
    const own = kx.length >= 8 ? fitConcentricEllipses([{ xPx: Float64Array.from(kx), yPx: Float64Array.from(ky), sigmaPx: Float64Array.from(ks) }], { start: frame, fitDistortion, rejectSigmas: Infinity }) : null;
    return {
      radiusPx: fit.radiiPx[u]!,
      radiusSigmaPx: fit.radiusSigmaPx[u]!,
      widthPx: s.widthPx,
      pointCount: s.xPx.length,
      keptCount: fit.keptCounts[u]!,
      coverage: s.xPx.length / s.wedgeCount,
      ellipse: direct.ok ? direct.ellipse : null,
      ownFrame: own && own.ok ? { frame: own.frame, sigma: own.sigma, radiusPx: own.radiiPx[0]!, radiusSigmaPx: own.radiusSigmaPx[0]! } : null,
      points: { xPx: s.xPx, yPx: s.yPx, sigmaPx: s.sigmaPx, kept },
    };
  });
  return { ok: true, frame, sigma: fit.sigma, rings: out, iterations, converged, reducedChiSquare: fit.reducedChiSquare, rmsResidualPx: fit.rmsResidualPx, firstEstimate, warnings };
}

/** Candidates closer than fraction x radius merged into one spanning both (radius the mean, sigma half the gap plus the wider sigma). */
function mergeClose(found: RingCandidate[], fraction: number): Array<{ radiusPx: number; sigmaPx: number }> {
  const out: Array<{ radiusPx: number; sigmaPx: number; lo: number; hi: number }> = [];
  for (const c of found) {
    const prev = out[out.length - 1];
    if (prev && c.radiusPx - prev.hi < fraction * c.radiusPx) {
      prev.hi = c.radiusPx;
      prev.sigmaPx = Math.max(prev.sigmaPx, c.sigmaPx);
    } else {
      out.push({ radiusPx: c.radiusPx, sigmaPx: c.sigmaPx, lo: c.radiusPx, hi: c.radiusPx });
    }
  }
  return out.map((m) => ({ radiusPx: 0.5 * (m.lo + m.hi), sigmaPx: m.sigmaPx + 0.5 * (m.hi - m.lo) }));
}

/**
 * Search windows: half width max(3 sigma, sigma + 2) + 2 x the last centre shift
 * (a wrong centre moves a ring by up to the shift), but never past half the gap
 * to a neighbouring ring, and the width used in the fit at most half the window.
 */
function makeWindows(rings: Array<Pick<RingCandidate, 'radiusPx' | 'sigmaPx'>>, shiftPx: number): Array<{ window: RingWindow }> {
  return rings.map((r, k) => {
    let half = Math.max(3 * r.sigmaPx, r.sigmaPx + 2) + 2 * Math.min(shiftPx, 20);
    const prev = rings[k - 1], next = rings[k + 1];
    if (prev) half = Math.min(half, 0.5 * (r.radiusPx - prev.radiusPx));
    if (next) half = Math.min(half, 0.5 * (next.radiusPx - r.radiusPx));
    half = Math.min(half, r.radiusPx - 1);
    half = Math.max(half, 1.5);
    const sigmaPx = Math.min(r.sigmaPx, half / 2);
    return { window: { radiusPx: r.radiusPx, sigmaPx, halfWindowPx: half } };
  });
}
