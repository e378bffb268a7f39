/**
 * The noise of one pixel as a function of its mean value: variance = a mu + b.
 * For a detector that counts with c counts per unit of value and has read noise
 * sigma_r (in value units), a = 1/c and b = sigma_r^2 (Poisson counting plus
 * Gaussian read noise); a camera pedestal makes b smaller by a times the pedestal.
 *
 * Estimated from the radial profile itself: each bin's pixel-value scatter
 * (stdErr^2 x area, see azimuthal-integration.ts) against its mean, over the
 * bins away from peaks, is fitted by a straight line (weighted least squares,
 * weights from the sampling variance of a variance, 2 V^2 / (n - 3), bins more
 * than 4 of those standard deviations off the line dropped and the fit
 * repeated; the standard errors of slope and offset come from that fit,
 * widened by its Birge ratio when above 1). Plotting variance against mean to find the gain is the photon
 * transfer method of camera testing (J. R. Janesick, Photon Transfer, SPIE
 * Press 2007; from memory). When the bins do not span enough intensity to fix
 * the slope (its standard error above a third of it) or the line goes
 * negative, the variance is taken as constant. Texture or spotty rings inflate
 * a bin's scatter, not the counting noise, which is why this model (not the
 * scatter) sets what counting noise explains in ring-quality.ts and the weights
 * of the ring fits in measure-rings.ts.
 */

import type { RadialProfile } from './radial-profile';
import { medianOf } from './sample-median';

export interface ProfileNoiseModel {
  /** a in variance = a mu + b (value units; 1 / counts per value for a counting detector). */
  varianceSlope: number;
  /** b in variance = a mu + b (value units squared). */
  varianceOffset: number;
  /** 'given' from known counts per value; 'linear' or 'constant' when estimated from a profile. */
  source: 'given' | 'linear' | 'constant';
  /** Profile bins the estimate rests on (0 when given). */
  binsUsed: number;
  /** Standard errors of the slope and offset from the fit (0 when given; slope 0 for a constant model). */
  varianceSlopeSigma: number;
  varianceOffsetSigma: number;
}

/** Variance of one pixel of mean value `mean` under `model`, floored at a tiny positive value. */
export function noiseVarianceAt(model: ProfileNoiseModel, mean: number): number {
  const v = model.varianceSlope * mean + model.varianceOffset;
  return v > 1e-300 ? v : 1e-300;
}

/**
 * The model of a counting detector.
 * @param countsPerValue counts per unit of pixel value (> 0)
 * @param readNoiseValue read noise of a pixel in value units (>= 0; default 0)
 */
export function countingNoiseModel(countsPerValue: number, readNoiseValue = 0): ProfileNoiseModel {
  if (!(countsPerValue > 0) || !Number.isFinite(countsPerValue)) throw new RangeError(`countsPerValue must be positive and finite; got ${countsPerValue}`);
  if (!(readNoiseValue >= 0) || !Number.isFinite(readNoiseValue)) throw new RangeError(`readNoiseValue must be finite and >= 0; got ${readNoiseValue}`);
  return { varianceSlope: 1 / countsPerValue, varianceOffset: readNoiseValue * readNoiseValue, source: 'given', binsUsed: 0, varianceSlopeSigma: 0, varianceOffsetSigma: 0 };
}

export interface NoiseEstimateOptions {
  /** 1 for bins to leave out (peaks), same length as the profile; default none. */
  exclude?: ArrayLike<number>;
  /** Fewest pixels a bin needs to take part (default 16). */
  minPixels?: number;
}

/**
 * Estimates the pixel noise model from a profile whose stdErr comes from the
 * scatter of pixel values. Returns null when fewer than 5 bins qualify (a
 * profile too short or too masked to tell).
 */
export function estimateProfileNoiseModel(profile: RadialProfile, options: NoiseEstimateOptions = {}): ProfileNoiseModel | null {
  const minPixels = options.minPixels ?? 16;
  const exclude = options.exclude;
  const n = profile.mean.length;
  if (exclude && exclude.length !== n) throw new RangeError(`exclude must have one entry per profile bin (${n}); got ${exclude.length}`);
  const mu: number[] = [];
  const variance: number[] = [];
  const dof: number[] = [];
  for (let k = 0; k < n; k++) {
    if (exclude && exclude[k]) continue;
    const a = profile.area[k]!;
    const m = profile.mean[k]!;
    const e = profile.stdErr[k]!;
    if (!(a >= minPixels) || !Number.isFinite(m) || !Number.isFinite(e) || !(e > 0)) continue;
    mu.push(m);
    variance.push(e * e * a);
    dof.push(a - 3);
  }
  const count = mu.length;
  if (count < 5) return null;

  const keep = new Uint8Array(count).fill(1);
  let slope = 0;
  let offset = medianOf(variance);
  let linear = false;
  let slopeSigma = 0;
  let offsetSigma = 0;
  for (let iteration = 0; iteration < 8; iteration++) {
    // Weighted least squares of V = slope mu + offset, weights (n - 3) / (2 Vmodel^2).
    let sw = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (let i = 0; i < count; i++) {
      if (!keep[i]) continue;
      const vm = Math.max(slope * mu[i]! + offset, 1e-300);
      const w = dof[i]! / (2 * vm * vm);
      sw += w;
      sx += w * mu[i]!;
      sy += w * variance[i]!;
      sxx += w * mu[i]! * mu[i]!;
      sxy += w * mu[i]! * variance[i]!;
    }
    const det = sw * sxx - sx * sx;
    let nextSlope = 0;
    let nextOffset = sy / sw;
    linear = false;
    slopeSigma = 0;
    offsetSigma = Math.sqrt(1 / sw);
    if (det > 1e-12 * sw * sxx) {
      const a = (sw * sxy - sx * sy) / det;
      const b = (sxx * sy - sx * sxy) / det;
      const aSigma = Math.sqrt(sw / det);
      let positive = a > 0;
      for (let i = 0; i < count && positive; i++) if (keep[i] && a * mu[i]! + b <= 0) positive = false;
      if (positive && aSigma < a / 3) {
        nextSlope = a;
        nextOffset = b;
        linear = true;
        slopeSigma = aSigma;
        offsetSigma = Math.sqrt(sxx / det);
      }
    }
    slope = nextSlope;
    offset = nextOffset;
    let changed = false;
    for (let i = 0; i < count; i++) {
      const vm = Math.max(slope * mu[i]! + offset, 1e-300);
      const z = (variance[i]! - vm) / (vm * Math.sqrt(2 / dof[i]!));
      const k = Math.abs(z) <= 4 ? 1 : 0;
      if (k !== keep[i]) changed = true;
      keep[i] = k;
    }
    if (!changed && iteration > 0) break;
  }
  let used = 0;
  let chi2 = 0;
  for (let i = 0; i < count; i++) {
    if (!keep[i]) continue;
    used++;
    const vm = Math.max(slope * mu[i]! + offset, 1e-300);
    chi2 += ((variance[i]! - vm) ** 2 * dof[i]!) / (2 * vm * vm);
  }
  if (used < 5) return null;
  // Standard errors widened by the Birge ratio of the fit when its scatter exceeds the sampling model's.
  const birge = Math.sqrt(Math.max(1, chi2 / Math.max(used - (linear ? 2 : 1), 1)));
  return {
    varianceSlope: slope,
    varianceOffset: offset,
    source: linear ? 'linear' : 'constant',
    binsUsed: used,
    varianceSlopeSigma: slopeSigma * birge,
    varianceOffsetSigma: offsetSigma * birge,
  };
}

/** Standard error of each bin's mean under the model: sqrt(variance(mean) / area); NaN for empty bins. */
export function profileNoiseStdErr(profile: RadialProfile, model: ProfileNoiseModel): Float64Array {
  const out = new Float64Array(profile.mean.length);
  for (let k = 0; k < out.length; k++) {
    const a = profile.area[k]!;
    const m = profile.mean[k]!;
    out[k] = a > 0 && Number.isFinite(m) ? Math.sqrt(noiseVarianceAt(model, m) / a) : Number.NaN;
  }
  return out;
}
