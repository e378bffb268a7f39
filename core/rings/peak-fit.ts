/**
 * Least-squares fits of pseudo-Voigt peaks (pseudo-voigt.ts: area, centre, FWHM,
 * mixing eta) on a local polynomial background to a radial profile, by
 * core/fitting/levenberg-marquardt.ts with weights 1/stdErr^2.
 *
 * Model over a window of bins r_k, t_k = (r_k - r_mid) / h:
 *   y_k = b_k + c0 + c1 t_k [+ c2 (t_k^2 - 1/3)] + sum_j pV_j(r_k)
 * with b_k a fixed baseline (the SNIP background, or 0), a line (default) or a
 * parabola (backgroundTerms 3) that takes up what the baseline leaves (h the
 * window's half-width, so the coefficients are in the units of y), and one
 * pseudo-Voigt per peak. Each peak's window is its centre +- halfWindowFwhm
 * (default 3) FWHM; peaks whose windows overlap are fitted together over the
 * union of their windows. The FWHM and centre that set the windows (and start
 * the group fit) come from a first fit of each peak alone, so that a generous
 * starting width does not chain neighbours into one long window.
 *
 * eta is fitted freely; when it leaves [0, 1] it is fixed at the nearer bound
 * and the group fitted again; when the normal matrix is singular, the group is
 * fitted again with every eta fixed at 0.5. A group is then fitted again without
 * one of its peaks, until none of these remains:
 *  - two peaks within half a FWHM of each other (one peak seen twice): the
 *    broader goes when it is 1.5 times as broad (a fit to background under a
 *    ring), else the lower;
 *  - a peak that fails its checks (area not significant, centre gone from its
 *    start or window, width as large as the window): the failing peak with the
 *    lowest start goes, so that a spurious detection cannot spoil the fit of a
 *    good neighbour;
 *  - a normal matrix that stays singular (two starts on one peak): the lowest
 *    start goes.
 *
 * Uncertainty of the radius: sqrt(C_RR) from the absolute covariance
 * (J^T W J)^-1, multiplied by sqrt(chi^2 / E[chi^2]) when that exceeds 1 (the
 * Birge ratio; common practice), E[chi^2] = n - m for independent bins and
 * sum(binVarianceRatio) - m for bins that share split pixels. The weights are
 * measured standard errors, so the absolute covariance is the honest one when
 * the model describes the data; when it does not (texture, grain sampling, a
 * shape the pseudo-Voigt misses), the scaling widens the uncertainty to match
 * the scatter actually seen, and never narrows it. Both figures are returned.
 *
 * A fit that fails comes back with status 'failed' and the reason; nothing is
 * thrown for data that cannot be fitted.
 */

import { levenbergMarquardt } from '../fitting';
import { pseudoVoigtAreaFromHeight, pseudoVoigtHeight, pseudoVoigtWithDerivatives } from './pseudo-voigt';

/** Where a fit starts: a position, a width and a height above the baseline. */
export interface PeakStart {
  radiusPx: number;
  fwhmPx: number;
  /** Height above the baseline, profile units (a starting value; > 0 is best). */
  height: number;
}

export interface PeakFitOptions {
  /** Each peak's window half-width in FWHMs (> 0; default 3). */
  halfWindowFwhm?: number;
  /** Fewest standard deviations of the fitted area for a peak to count (default 3). */
  minAreaSignificance?: number;
  /** Fit eta (default true); false fixes it at `fixedEta`. */
  fitEta?: boolean;
  /** eta used when not fitted (default 0.5). */
  fixedEta?: number;
  /** Terms of the local background polynomial in (r - r_mid)/h: 2 (a line, default) or 3 (a parabola). */
  backgroundTerms?: 2 | 3;
  /**
   * Per bin, the variance of the value over stdErr^2, in (0, 1] (default 1:
   * independent bins). For split profiles area / effectiveCount: the chi-square
   * expected from noise alone is then sum(ratio) - m, the baseline of the Birge ratio.
   */
  binVarianceRatio?: ArrayLike<number>;
}

export interface PeakFitResult {
  status: 'ok' | 'failed';
  /** Why the fit failed, or a note on how it was made (eta fixed, ...); null when nothing to say. */
  reason: string | null;
  radiusPx: number;
  /** Standard uncertainty of radiusPx: absolute, widened by the Birge ratio when above 1, px. */
  radiusSigmaPx: number;
  /** sqrt(C_RR) from the absolute covariance alone, px. */
  radiusSigmaAbsolutePx: number;
  fwhmPx: number;
  fwhmSigmaPx: number;
  eta: number;
  /** Integrated intensity of the peak in the profile (profile units x px). */
  area: number;
  areaSigma: number;
  /** Peak height above the background, profile units. */
  height: number;
  /** Height over the profile's standard error at the peak. */
  snr: number;
  reducedChiSquare: number;
  /** Factor applied to the absolute uncertainties: sqrt(chi^2 / expected chi^2) when above 1, else 1. */
  birgeRatio: number;
  /** Radial range of the group's fit window, px. */
  windowPx: [number, number];
  /** Peaks fitted together with this one (including it). */
  groupSize: number;
}

interface GroupPeak {
  index: number;
  start: PeakStart;
}

/**
 * Fits every peak of `starts` (one result per start, same order).
 * @param radiusPx bin centres, px
 * @param values profile values (e.g. mean)
 * @param stdErr standard error of each value (weights 1/stdErr^2); bins with a non-finite or non-positive one are left out
 * @param baseline fixed background under the peaks, or null for none
 * @throws RangeError for arrays of different lengths or options out of range
 */
export function fitPeaks(
  radiusPx: ArrayLike<number>,
  values: ArrayLike<number>,
  stdErr: ArrayLike<number>,
  baseline: ArrayLike<number> | null,
  starts: readonly PeakStart[],
  options: PeakFitOptions = {},
): PeakFitResult[] {
  const n = radiusPx.length;
  if (values.length !== n || stdErr.length !== n || (baseline && baseline.length !== n)) {
    throw new RangeError(`radiusPx, values, stdErr and baseline must have the same length; got ${n}, ${values.length}, ${stdErr.length}, ${baseline?.length ?? n}`);
  }
  const k = options.halfWindowFwhm ?? 3;
  if (!(k > 0)) throw new RangeError(`halfWindowFwhm must be positive; got ${k}`);
  starts.forEach((s, i) => {
    if (!Number.isFinite(s.radiusPx) || !(s.fwhmPx > 0) || !Number.isFinite(s.height)) {
      throw new RangeError(`starts[${i}] needs a finite radiusPx, a positive fwhmPx and a finite height; got ${s.radiusPx}, ${s.fwhmPx}, ${s.height}`);
    }
  });
  // Starting widths and positions refined by a fit of each peak alone (kept when that fails).
  const refined = starts.map((s) => {
    const alone = fitGroup(radiusPx, values, stdErr, baseline, [{ index: 0, start: s }], k, options)[0]!;
    const usable = alone.status === 'ok' && alone.fwhmPx < 2 * s.fwhmPx && Math.abs(alone.radiusPx - s.radiusPx) < s.fwhmPx;
    return usable ? { radiusPx: alone.radiusPx, fwhmPx: alone.fwhmPx, height: alone.height } : s;
  });
  const results: PeakFitResult[] = new Array(starts.length);
  const order = refined.map((start, index) => ({ index, start })).sort((a, b) => a.start.radiusPx - b.start.radiusPx);
  let group: GroupPeak[] = [];
  let groupHi = -Infinity;
  const flush = () => {
    if (group.length > 0) fitGroup(radiusPx, values, stdErr, baseline, group, k, options).forEach((r, i) => (results[group[i]!.index] = r));
    group = [];
  };
  for (const p of order) {
    const lo = p.start.radiusPx - k * p.start.fwhmPx;
    if (lo > groupHi) flush();
    group.push(p);
    groupHi = Math.max(groupHi, p.start.radiusPx + k * p.start.fwhmPx);
  }
  flush();
  return results;
}

/**
 * Fits one group, dropping duplicate and failing peaks until none remain; the
 * window is the union of the windows of the peaks still in. Results in group order.
 */
function fitGroup(
  radiusPx: ArrayLike<number>,
  values: ArrayLike<number>,
  stdErr: ArrayLike<number>,
  baseline: ArrayLike<number> | null,
  group: GroupPeak[],
  k: number,
  options: PeakFitOptions,
): PeakFitResult[] {
  let active = group.map((_, i) => i);
  const out: PeakFitResult[] = new Array(group.length);
  while (active.length > 0) {
    const starts = active.map((i) => group[i]!.start);
    const lo = Math.min(...starts.map((p) => p.radiusPx - k * p.fwhmPx));
    const hi = Math.max(...starts.map((p) => p.radiusPx + k * p.fwhmPx));
    const windowPx: [number, number] = [lo, hi];
    const bins: number[] = [];
    for (let i = 0; i < radiusPx.length; i++) {
      const r = radiusPx[i]!;
      if (r < lo || r > hi) continue;
      const v = values[i]!;
      const e = stdErr[i]!;
      const b = baseline ? baseline[i]! : 0;
      if (Number.isFinite(v) && Number.isFinite(e) && e > 0 && Number.isFinite(b)) bins.push(i);
    }
    const failRest = (reason: string): PeakFitResult[] => {
      for (const i of active) out[i] = failed(group[i]!.start, reason, windowPx, group.length);
      return out;
    };
    if (bins.length < 4 * starts.length + 2 + 3) {
      return failRest(`too few usable bins (${bins.length}) in ${lo.toFixed(1)}..${hi.toFixed(1)} px for ${starts.length} peak(s)`);
    }
    const fit = fitWindow(radiusPx, values, stdErr, baseline, bins, starts, windowPx, options);
    if (fit === null) {
      if (active.length === 1) return failRest('the fit did not converge to a usable minimum (singular normal matrix)');
      // Peaks the data cannot tell apart: drop the lowest start and fit the rest again.
      const lowest = active.reduce((a, b) => (group[b]!.start.height < group[a]!.start.height ? b : a));
      out[lowest] = failed(group[lowest]!.start, 'cannot be told apart from a neighbouring peak (singular normal matrix)', windowPx, group.length);
      active = active.filter((i) => i !== lowest);
      continue;
    }
    // Duplicates: two peaks within half a FWHM of each other.
    let drop = -1;
    for (let a = 0; a < fit.length && drop < 0; a++) {
      for (let b = a + 1; b < fit.length; b++) {
        if (Math.abs(fit[a]!.radiusPx - fit[b]!.radiusPx) < 0.5 * Math.max(fit[a]!.fwhmPx, fit[b]!.fwhmPx)) {
          const fa = fit[a]!;
          const fb = fit[b]!;
          const ratio = fa.fwhmPx / fb.fwhmPx;
          drop = ratio > 1.5 ? a : ratio < 1 / 1.5 ? b : fa.height < fb.height ? a : b;
          break;
        }
      }
    }
    if (drop >= 0) {
      const gone = active[drop]!;
      out[gone] = failed(group[gone]!.start, 'merged into a neighbouring peak (two detections of one peak)', windowPx, group.length);
      active = active.filter((_, i) => i !== drop);
      continue;
    }
    const checked = active.map((gi, i) => checkPeak(fit[i]!, group[gi]!.start, options, group.length));
    // A peak that fails takes the group's fit with it: drop the failed one with the lowest start and refit the rest.
    const failedAt = checked.map((c, i) => (c.status === 'failed' ? i : -1)).filter((i) => i >= 0);
    if (failedAt.length > 0 && active.length > 1) {
      const weakest = failedAt.reduce((a, b) => (group[active[b]!]!.start.height < group[active[a]!]!.start.height ? b : a));
      out[active[weakest]!] = checked[weakest]!;
      active = active.filter((_, i) => i !== weakest);
      continue;
    }
    active.forEach((gi, i) => (out[gi] = checked[i]!));
    return out;
  }
  return out;
}

function failed(start: PeakStart, reason: string, windowPx: [number, number], groupSize: number): PeakFitResult {
  return {
    status: 'failed',
    reason,
    radiusPx: start.radiusPx,
    radiusSigmaPx: Number.NaN,
    radiusSigmaAbsolutePx: Number.NaN,
    fwhmPx: start.fwhmPx,
    fwhmSigmaPx: Number.NaN,
    eta: Number.NaN,
    area: Number.NaN,
    areaSigma: Number.NaN,
    height: start.height,
    snr: Number.NaN,
    reducedChiSquare: Number.NaN,
    birgeRatio: Number.NaN,
    windowPx,
    groupSize,
  };
}

function checkPeak(r: PeakFitResult, start: PeakStart, options: PeakFitOptions, groupSize: number): PeakFitResult {
  if (r.status === 'failed') return { ...r, groupSize };
  const minSig = options.minAreaSignificance ?? 3;
  const [lo, hi] = r.windowPx;
  let reason: string | null = null;
  if (!(r.area > 0)) reason = `fitted area ${r.area.toPrecision(3)} is not positive`;
  else if (!(r.area >= minSig * r.areaSigma)) reason = `fitted area is only ${(r.area / r.areaSigma).toFixed(1)} standard deviations (< ${minSig})`;
  else if (r.radiusPx < lo || r.radiusPx > hi) reason = `the centre left the fit window ${lo.toFixed(1)}..${hi.toFixed(1)} px`;
  else if (Math.abs(r.radiusPx - start.radiusPx) > Math.max(start.fwhmPx, 1)) {
    reason = `the centre moved ${(r.radiusPx - start.radiusPx).toFixed(2)} px from its detection, more than the starting FWHM`;
  } else if (!(r.fwhmPx < hi - lo)) reason = `fitted FWHM ${r.fwhmPx.toFixed(2)} px is as wide as the fit window`;
  else if (!Number.isFinite(r.radiusSigmaPx)) reason = 'no finite uncertainty for the radius';
  if (reason !== null) return { ...r, status: 'failed', reason, groupSize };
  return { ...r, groupSize };
}

/**
 * One Levenberg-Marquardt fit of the peaks `starts` over `bins`, with the eta
 * handling described at the top. null when no attempt gives a covariance.
 */
function fitWindow(
  radiusPx: ArrayLike<number>,
  values: ArrayLike<number>,
  stdErr: ArrayLike<number>,
  baseline: ArrayLike<number> | null,
  bins: number[],
  starts: PeakStart[],
  windowPx: [number, number],
  options: PeakFitOptions,
): PeakFitResult[] | null {
  const np = starts.length;
  const fitEta = options.fitEta ?? true;
  const fixedEtaDefault = options.fixedEta ?? 0.5;
  if (!(fixedEtaDefault >= 0 && fixedEtaDefault <= 1)) throw new RangeError(`fixedEta must be in [0, 1]; got ${fixedEtaDefault}`);
  const nObs = bins.length;
  const r = Float64Array.from(bins, (i) => radiusPx[i]!);
  const y = Float64Array.from(bins, (i) => values[i]! - (baseline ? baseline[i]! : 0));
  const invSigma = Float64Array.from(bins, (i) => 1 / stdErr[i]!);
  const rMid = 0.5 * (windowPx[0] + windowPx[1]);
  const hw = Math.max(0.5 * (windowPx[1] - windowPx[0]), 1e-9);
  const width = windowPx[1] - windowPx[0];
  const nbg = options.backgroundTerms ?? 2;
  if (nbg !== 2 && nbg !== 3) throw new RangeError(`backgroundTerms must be 2 or 3; got ${String(nbg)}`);
  // The background starts as the line through the means of the first and last tenth of the window.
  const tenth = Math.max(1, Math.floor(nObs / 10));
  let left = 0;
  let right = 0;
  for (let i = 0; i < tenth; i++) {
    left += y[i]! / tenth;
    right += y[nObs - 1 - i]! / tenth;
  }
  const level0 = 0.5 * (left + right);
  const slope0 = 0.5 * (right - left);

  // Per peak: eta fitted (NaN) or fixed at a value.
  let etaFixed: number[] = starts.map(() => (fitEta ? Number.NaN : fixedEtaDefault));
  let previous: Float64Array | null = null;
  let note: string | null = fitEta ? null : `eta fixed at ${fixedEtaDefault}`;
  for (let attempt = 0; attempt < 3; attempt++) {
    const slots: number[] = []; // parameter index of each peak's first parameter
    let m = nbg;
    for (let j = 0; j < np; j++) {
      slots.push(m);
      m += Number.isNaN(etaFixed[j]!) ? 4 : 3;
    }
    if (nObs <= m) return null;
    const p0 = new Float64Array(m);
    p0[0] = level0;
    p0[1] = slope0;
    for (let j = 0; j < np; j++) {
      const o = slots[j]!;
      const eta0 = Number.isNaN(etaFixed[j]!) ? 0.5 : etaFixed[j]!;
      if (previous) {
        p0[o] = previous[j * 4]!;
        p0[o + 1] = previous[j * 4 + 1]!;
        p0[o + 2] = previous[j * 4 + 2]!;
      } else {
        p0[o] = pseudoVoigtAreaFromHeight(Math.max(starts[j]!.height, 1e-12), starts[j]!.fwhmPx, eta0);
        p0[o + 1] = starts[j]!.radiusPx;
        p0[o + 2] = starts[j]!.fwhmPx;
      }
      if (Number.isNaN(etaFixed[j]!)) p0[o + 3] = previous ? Math.min(1, Math.max(0, previous[j * 4 + 3]!)) : eta0;
    }
    const d = new Float64Array(5);
    const fit = levenbergMarquardt(
      {
        observationCount: nObs,
        parameterCount: m,
        evaluate(p, res, jac) {
          for (let j = 0; j < np; j++) {
            const o = slots[j]!;
            const f = p[o + 2]!;
            const c = p[o + 1]!;
            const eta = Number.isNaN(etaFixed[j]!) ? p[o + 3]! : etaFixed[j]!;
            if (!(f > 0) || !(f < 4 * width) || !(c > windowPx[0] - width) || !(c < windowPx[1] + width) || !(eta > -0.5 && eta < 1.5)) {
              res.fill(Number.NaN);
              return;
            }
          }
          for (let i = 0; i < nObs; i++) {
            const t = (r[i]! - rMid) / hw;
            const t2 = t * t - 1 / 3;
            let model = p[0]! + p[1]! * t + (nbg === 3 ? p[2]! * t2 : 0);
            const row = i * m;
            const is = invSigma[i]!;
            if (jac) {
              jac[row] = -is;
              jac[row + 1] = -t * is;
              if (nbg === 3) jac[row + 2] = -t2 * is;
            }
            for (let j = 0; j < np; j++) {
              const o = slots[j]!;
              const free = Number.isNaN(etaFixed[j]!);
              const eta = free ? p[o + 3]! : etaFixed[j]!;
              pseudoVoigtWithDerivatives(p[o]!, p[o + 1]!, p[o + 2]!, eta, r[i]!, d);
              model += d[0]!;
              if (jac) {
                jac[row + o] = -d[1]! * is;
                jac[row + o + 1] = -d[2]! * is;
                jac[row + o + 2] = -d[3]! * is;
                if (free) jac[row + o + 3] = -d[4]! * is;
              }
            }
            res[i] = (y[i]! - model) * is;
          }
        },
      },
      p0,
      { maxIterations: 200 },
    );
    const params = new Float64Array(np * 4);
    for (let j = 0; j < np; j++) {
      const o = slots[j]!;
      params[j * 4] = fit.parameters[o]!;
      params[j * 4 + 1] = fit.parameters[o + 1]!;
      params[j * 4 + 2] = fit.parameters[o + 2]!;
      params[j * 4 + 3] = Number.isNaN(etaFixed[j]!) ? fit.parameters[o + 3]! : etaFixed[j]!;
    }
    if (fit.covariance === null) {
      if (etaFixed.every((e) => !Number.isNaN(e))) return null;
      etaFixed = etaFixed.map(() => 0.5);
      note = 'eta fixed at 0.5 (the fit could not separate it)';
      previous = params;
      continue;
    }
    const outOfRange = etaFixed.map((e, j) => Number.isNaN(e) && (params[j * 4 + 3]! < 0 || params[j * 4 + 3]! > 1));
    if (outOfRange.some((x) => x) && attempt < 2) {
      etaFixed = etaFixed.map((e, j) => (outOfRange[j] ? (params[j * 4 + 3]! < 0 ? 0 : 1) : e));
      note = 'eta fixed at a bound of [0, 1]';
      previous = params;
      continue;
    }
    let expected = -m;
    for (const i of bins) expected += options.binVarianceRatio ? Math.min(1, Math.max(options.binVarianceRatio[i]!, 1e-3)) : 1;
    const birge = Math.sqrt(Math.max(1, fit.chiSquare / Math.max(expected, 1)));
    const cov = fit.covariance;
    const sd = (idx: number) => Math.sqrt(Math.max(cov[idx * m + idx]!, 0));
    return starts.map((_, j) => {
      const o = slots[j]!;
      const area = params[j * 4]!;
      const fwhm = params[j * 4 + 2]!;
      const eta = params[j * 4 + 3]!;
      const height = pseudoVoigtHeight({ area, centerPx: params[j * 4 + 1]!, fwhmPx: fwhm, eta });
      const centre = params[j * 4 + 1]!;
      let nearest = 0;
      let best = Infinity;
      for (let i = 0; i < nObs; i++) {
        const dist = Math.abs(r[i]! - centre);
        if (dist < best) {
          best = dist;
          nearest = i;
        }
      }
      const sigmaR = sd(o + 1);
      return {
        status: fit.converged ? ('ok' as const) : ('failed' as const),
        reason: fit.converged ? note : `the fit did not converge (${fit.reason})`,
        radiusPx: centre,
        radiusSigmaPx: sigmaR * birge,
        radiusSigmaAbsolutePx: sigmaR,
        fwhmPx: fwhm,
        fwhmSigmaPx: sd(o + 2) * birge,
        eta,
        area,
        areaSigma: sd(o) * birge,
        height,
        snr: height * invSigma[nearest]!,
        reducedChiSquare: fit.reducedChiSquare,
        birgeRatio: birge,
        windowPx,
        groupSize: np,
      };
    });
  }
  return null;
}
