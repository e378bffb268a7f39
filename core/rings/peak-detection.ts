/**
 * Detection of ring peaks in a background-subtracted radial profile by their
 * significance over the local noise.
 *
 * The net profile y (profile minus background) is filtered at several scales
 * with the Ricker wavelet psi(t) = (1 - t^2/s^2) exp(-t^2 / 2 s^2) (the negative
 * second derivative of a Gaussian; its zero sum ignores what is left of a smooth
 * background), and each filter output is expressed in units of its own noise:
 *
 *   z_s(k) = sum_t psi(t) y(k + t) / sqrt(sum_t psi(t)^2 stdErr(k + t)^2)
 *
 * (bins taken as independent; see azimuthal-integration.ts for why the bin
 * standard errors keep the information of a smooth filter right). For a
 * Gaussian peak of standard deviation sigma the noise-normalised response is
 * largest at s = sqrt(5) sigma (maximise s^(5/2) / (s^2 + sigma^2)^(3/2), from
 * the convolution of the wavelet with the Gaussian), so the best scale gives a
 * first FWHM of 2.3548 s / sqrt(5) = 1.053 s. The FWHM reported is the width at
 * half the net value of the detection bin, read off the net profile (linear
 * interpolation between bins), when both half-maximum points lie within two
 * such widths and it is within a factor 2 of the scale's; otherwise (close
 * neighbours, a sloping residual) the scale's.
 *
 * A detection is a local maximum of z_s within +-s bins with z_s above the
 * threshold (default 5 sigma; common practice for claiming a feature in
 * counting data). Scales are visited from broad to narrow. The candidates of a
 * narrower scale that lie within one (broader) scale of a peak already found
 * replace it by two or more peaks when the significance dips by 3 or more
 * between each neighbouring pair (close peaks the broad filter had merged), or
 * else by the most significant of them if it beats the peak (the same peak at a
 * better-matched scale); the others are dropped, and candidates near no peak
 * are new peaks. A profile with no significant peak gives an empty list.
 */

export interface PeakCandidate {
  /** Bin of the detection. */
  binIndex: number;
  /** Position refined by a parabola through the significance around the maximum, px. */
  radiusPx: number;
  /** FWHM from the best-matched filter scale, px (a starting value for the fit). */
  fwhmPx: number;
  /** Filter significance at that scale, in standard deviations. */
  significance: number;
  /** Net profile value at the detection bin. */
  height: number;
}

export interface PeakDetectionOptions {
  /** Significance a peak must exceed, standard deviations (> 0; default 5). */
  thresholdSigma?: number;
  /** Narrowest peak FWHM looked for, px (default: 3 bins or 1 px, whichever is larger). */
  minFwhmPx?: number;
  /** Broadest peak FWHM looked for, px (default 24 px; measure-rings ties it to the background window). */
  maxFwhmPx?: number;
  /** Ratio between successive filter scales (> 1; default 1.25). */
  scaleRatio?: number;
}

/** FWHM of the Gaussian best matched by a Ricker wavelet of scale s: 2 sqrt(2 ln 2) s / sqrt(5). */
export const RICKER_FWHM_PER_SCALE = (2 * Math.sqrt(2 * Math.LN2)) / Math.sqrt(5);

/**
 * Significant peaks of `net` (profile minus background) with bin standard
 * errors `stdErr`, on bins of centres `radiusPx` spaced `binWidthPx`.
 * Non-finite net values or standard errors (empty bins) are left out of every sum.
 * @returns candidates sorted by radius
 * @throws RangeError for arrays of different lengths or options out of range
 */
export function detectPeaks(
  radiusPx: ArrayLike<number>,
  binWidthPx: number,
  net: ArrayLike<number>,
  stdErr: ArrayLike<number>,
  options: PeakDetectionOptions = {},
): PeakCandidate[] {
  const n = radiusPx.length;
  if (net.length !== n || stdErr.length !== n) {
    throw new RangeError(`radiusPx, net and stdErr must have the same length; got ${n}, ${net.length}, ${stdErr.length}`);
  }
  if (!(binWidthPx > 0)) throw new RangeError(`binWidthPx must be positive; got ${binWidthPx}`);
  const threshold = options.thresholdSigma ?? 5;
  const minFwhm = options.minFwhmPx ?? Math.max(3 * binWidthPx, 1);
  const maxFwhm = options.maxFwhmPx ?? 24;
  const ratio = options.scaleRatio ?? 1.25;
  if (!(threshold > 0)) throw new RangeError(`thresholdSigma must be positive; got ${threshold}`);
  if (!(minFwhm > 0) || !(maxFwhm >= minFwhm)) throw new RangeError(`need 0 < minFwhmPx <= maxFwhmPx; got ${minFwhm} and ${maxFwhm}`);
  if (!(ratio > 1)) throw new RangeError(`scaleRatio must exceed 1; got ${ratio}`);

  const y = new Float64Array(n);
  const var2 = new Float64Array(n);
  const ok = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    const v = net[k]!;
    const e = stdErr[k]!;
    if (Number.isFinite(v) && Number.isFinite(e) && e > 0) {
      y[k] = v;
      var2[k] = e * e;
      ok[k] = 1;
    }
  }
  const scales: number[] = [];
  for (let f = maxFwhm; f >= minFwhm * (1 - 1e-9); f /= ratio) scales.push(f / RICKER_FWHM_PER_SCALE / binWidthPx);

  interface Found extends PeakCandidate { scaleBins: number }
  let found: Found[] = [];
  const z = new Float64Array(n);
  for (const sBins of scales) {
    rickerSignificance(y, var2, ok, sBins, z);
    const half = Math.max(1, Math.round(sBins));
    const candidates: Found[] = [];
    for (let k = 0; k < n; k++) {
      const zk = z[k]!;
      if (!(zk > threshold)) continue;
      let isMax = true;
      for (let d = -half; d <= half && isMax; d++) {
        if (d === 0) continue;
        const q = k + d;
        if (q >= 0 && q < n && z[q]! > zk) isMax = false;
      }
      if (!isMax) continue;
      const pos = refine(z, k);
      const scaleFwhmBins = RICKER_FWHM_PER_SCALE * sBins;
      candidates.push({
        binIndex: k,
        radiusPx: radiusPx[k]! + pos * binWidthPx,
        fwhmPx: widthNear(halfMaximumWidthBins(y, ok, k, 2 * scaleFwhmBins), scaleFwhmBins) * binWidthPx,
        significance: zk,
        height: y[k]!,
        scaleBins: sBins,
      });
    }
    const claimed = new Set<Found>();
    const next: Found[] = [];
    for (const peak of found) {
      const mine = candidates.filter((c) => !claimed.has(c) && Math.abs(c.radiusPx - peak.radiusPx) < peak.scaleBins * binWidthPx);
      mine.forEach((c) => claimed.add(c));
      if (mine.length >= 2 && resolved(mine, z, 3)) next.push(...mine);
      else {
        const best = mine.reduce<Found | null>((b, c) => (b === null || c.significance > b.significance ? c : b), null);
        next.push(best !== null && best.significance > peak.significance ? best : peak);
      }
    }
    for (const c of candidates) if (!claimed.has(c)) next.push(c);
    found = next;
  }
  return found
    .sort((a, b) => a.radiusPx - b.radiusPx)
    .map(({ binIndex, radiusPx: r, fwhmPx, significance, height }) => ({ binIndex, radiusPx: r, fwhmPx, significance, height }));
}

/**
 * True when neighbouring candidates (by radius) are each separated by a dip of
 * the significance at least `dip` below the lower of the two: two peaks, not
 * noise on one.
 */
function resolved(candidates: { binIndex: number; significance: number }[], z: Float64Array, dip: number): boolean {
  const sorted = [...candidates].sort((a, b) => a.binIndex - b.binIndex);
  for (let i = 1; i < sorted.length; i++) {
    const a = sorted[i - 1]!;
    const b = sorted[i]!;
    let low = Infinity;
    for (let k = a.binIndex; k <= b.binIndex; k++) if (z[k]! < low) low = z[k]!;
    if (!(low < Math.min(a.significance, b.significance) - dip)) return false;
  }
  return true;
}

/** z_s(k) for one scale (in bins) into `out`; NaN where too little of the wavelet has data. */
function rickerSignificance(y: Float64Array, var2: Float64Array, ok: Uint8Array, sBins: number, out: Float64Array): void {
  const n = y.length;
  const half = Math.ceil(4 * sBins);
  const psi = new Float64Array(2 * half + 1);
  let mean = 0;
  for (let t = -half; t <= half; t++) {
    const u = (t * t) / (sBins * sBins);
    psi[t + half] = (1 - u) * Math.exp(-0.5 * u);
    mean += psi[t + half]!;
  }
  mean /= psi.length;
  let full = 0;
  for (let t = 0; t < psi.length; t++) {
    psi[t] -= mean; // exact zero sum for the truncated, sampled wavelet
    full += psi[t]! * psi[t]!;
  }
  for (let k = 0; k < n; k++) {
    if (!ok[k]) {
      out[k] = Number.NaN;
      continue;
    }
    let f = 0;
    let v = 0;
    let cover = 0;
    const lo = Math.max(0, k - half);
    const hi = Math.min(n - 1, k + half);
    for (let q = lo; q <= hi; q++) {
      if (!ok[q]) continue;
      const w = psi[q - k + half]!;
      f += w * y[q]!;
      v += w * w * var2[q]!;
      cover += w * w;
    }
    out[k] = cover >= 0.6 * full && v > 0 ? f / Math.sqrt(v) : Number.NaN;
  }
}

/** Offset of the vertex of the parabola through z[k-1], z[k], z[k+1], in bins, within +-0.5. */
function refine(z: Float64Array, k: number): number {
  if (k === 0 || k === z.length - 1) return 0;
  const a = z[k - 1]!;
  const b = z[k]!;
  const c = z[k + 1]!;
  if (!Number.isFinite(a) || !Number.isFinite(c)) return 0;
  const den = a - 2 * b + c;
  if (!(den < 0)) return 0;
  return Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / den));
}

/** The measured half-maximum width when it agrees with the scale's within a factor 2, else the scale's. */
function widthNear(measuredBins: number, scaleBins: number): number {
  return measuredBins > 0.5 * scaleBins && measuredBins < 2 * scaleBins ? measuredBins : scaleBins;
}

/**
 * Width at half of y[k] around bin k, in bins, from the first crossings on
 * either side (linear interpolation); 0 when a side does not cross within
 * `limit` bins or meets an empty bin.
 */
function halfMaximumWidthBins(y: Float64Array, ok: Uint8Array, k: number, limit: number): number {
  const half = 0.5 * y[k]!;
  if (!(half > 0)) return 0;
  const side = (dir: number): number => {
    for (let d = 1; d <= limit; d++) {
      const q = k + dir * d;
      if (q < 0 || q >= y.length || !ok[q]) return Number.NaN;
      if (y[q]! <= half) {
        const prev = y[q - dir]!;
        return d - 1 + (prev - half) / (prev - y[q]!);
      }
    }
    return Number.NaN;
  };
  const w = side(-1) + side(1);
  return Number.isFinite(w) ? w : 0;
}
