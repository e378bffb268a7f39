/**
 * The photon-counting limit on a ring radius: the Cramer-Rao lower bound
 * sqrt((I^-1)_RR) from the Fisher information of Poisson bin counts,
 *
 *   I_ab = sum_k (d mu_k / d theta_a)(d mu_k / d theta_b) / mu_k
 *
 * (S. M. Kay, Fundamentals of Statistical Signal Processing: Estimation Theory,
 * Prentice Hall 1993, ch. 3; from memory), over annular bins of width w across
 * the ring's window R +- halfWindowFwhm FWHM. The expected counts of bin k at
 * radius r_k,
 *
 *   mu_k = 2 pi r_k w f [b0 + b1 (r_k - R) + A pV(r_k; R, F, eta)],
 *   A = N / (2 pi R f),
 *
 * hold the ring's N counts (over the visible fraction f of the circumference;
 * pV of unit area, pseudo-voigt.ts) on b0 background counts per pixel. Read
 * noise adds 2 pi r_k w f sigma_r^2 to the variance in the denominator (a
 * Gaussian approximation that neglects the information carried by the variance
 * itself, a relative 1/(2 mu) correction).
 *
 * With nuisance 'none' only R is unknown; with 'peak-and-line' (default) the
 * area, FWHM, eta and a straight background (b0, b1) are estimated along with
 * it, as peak-fit.ts does, and the bound is the RR element of the inverse of
 * the full information matrix (never smaller than the first). Fine bins
 * (default w = 0.05 px) give the limit of the continuous profile; a fit to a
 * profile binned coarser, or to pixels of finite size, cannot reach it.
 *
 * Check values (the unit tests): a Gaussian ring without background and with R
 * alone unknown gives sigma_G / sqrt(N), sigma_G = F / (2 sqrt(2 ln 2)); a
 * Lorentzian gives F / sqrt(2 N) (Fisher information of a Cauchy location,
 * 1 / (2 gamma^2), gamma = F/2; from memory).
 */

import { invertSymmetric } from '../fitting';
import { pseudoVoigtWithDerivatives } from './pseudo-voigt';

export interface RingCountModel {
  /** Ring radius, px (> 0). */
  radiusPx: number;
  /** FWHM of the radial profile, px (> 0). */
  fwhmPx: number;
  /** pseudo-Voigt mixing, 0 (Gaussian) to 1 (Lorentzian). */
  eta: number;
  /** Expected counts of the ring above the background over its visible part (> 0). */
  ringCounts: number;
  /** Expected background counts per pixel at the ring (>= 0). */
  backgroundCountsPerPx: number;
  /** Visible fraction of the circumference, (0, 1] (default 1). */
  visibleFraction?: number;
  /** Read-noise variance per pixel, counts^2 (>= 0; default 0). */
  readNoiseVarianceCounts2?: number;
}

export interface RadiusBoundOptions {
  /** Radial bin width of the counting model, px (> 0; default 0.05). */
  binWidthPx?: number;
  /** Half-width of the window in FWHMs (> 0; default 3, as the peak fits). */
  halfWindowFwhm?: number;
  /** What is estimated besides R (default 'peak-and-line'). */
  nuisance?: 'none' | 'peak-and-line';
  /** With 'peak-and-line': whether eta is estimated (default true). */
  fitEta?: boolean;
}

/**
 * Cramer-Rao bound on the standard deviation of an unbiased estimate of the
 * ring radius, px. Infinity when the information matrix is singular.
 * @example
 *   // 200 000 counts in a ring of FWHM 3 px at R = 150 px on 50 counts per pixel: 0.0062 px.
 *   radiusPrecisionBoundPx({ radiusPx: 150, fwhmPx: 3, eta: 0.3, ringCounts: 2e5, backgroundCountsPerPx: 50 });
 * @throws RangeError naming a parameter out of range
 */
export function radiusPrecisionBoundPx(model: RingCountModel, options: RadiusBoundOptions = {}): number {
  const { radiusPx: R, fwhmPx: F, eta, ringCounts: N, backgroundCountsPerPx: b0 } = model;
  const f = model.visibleFraction ?? 1;
  const rn2 = model.readNoiseVarianceCounts2 ?? 0;
  const w = options.binWidthPx ?? 0.05;
  const k = options.halfWindowFwhm ?? 3;
  const nuisance = options.nuisance ?? 'peak-and-line';
  const fitEta = options.fitEta ?? true;
  if (!(R > 0) || !Number.isFinite(R)) throw new RangeError(`radiusPx must be positive and finite; got ${R}`);
  if (!(F > 0) || !Number.isFinite(F)) throw new RangeError(`fwhmPx must be positive and finite; got ${F}`);
  if (!(eta >= 0 && eta <= 1)) throw new RangeError(`eta must be in [0, 1]; got ${eta}`);
  if (!(N > 0) || !Number.isFinite(N)) throw new RangeError(`ringCounts must be positive and finite; got ${N}`);
  if (!(b0 >= 0) || !Number.isFinite(b0)) throw new RangeError(`backgroundCountsPerPx must be finite and >= 0; got ${b0}`);
  if (!(f > 0 && f <= 1)) throw new RangeError(`visibleFraction must be in (0, 1]; got ${f}`);
  if (!(rn2 >= 0) || !Number.isFinite(rn2)) throw new RangeError(`readNoiseVarianceCounts2 must be finite and >= 0; got ${rn2}`);
  if (!(w > 0) || !Number.isFinite(w)) throw new RangeError(`binWidthPx must be positive and finite; got ${w}`);
  if (!(k > 0) || !Number.isFinite(k)) throw new RangeError(`halfWindowFwhm must be positive and finite; got ${k}`);
  if (nuisance !== 'none' && nuisance !== 'peak-and-line') throw new RangeError(`nuisance must be 'none' or 'peak-and-line'; got ${String(nuisance)}`);

  const amplitude = N / (2 * Math.PI * R * f);
  // Parameters: R, then A, F, (eta), b0, b1.
  const m = nuisance === 'none' ? 1 : fitEta ? 6 : 5;
  const fim = new Float64Array(m * m);
  const grad = new Float64Array(m);
  const d = new Float64Array(5);
  const lo = Math.max(0, R - k * F);
  const hi = R + k * F;
  const bins = Math.max(1, Math.round((hi - lo) / w));
  const step = (hi - lo) / bins;
  for (let i = 0; i < bins; i++) {
    const r = lo + (i + 0.5) * step;
    const areaPx = 2 * Math.PI * r * step * f;
    pseudoVoigtWithDerivatives(amplitude, R, F, eta, r, d);
    const mu = areaPx * (b0 + d[0]!);
    const variance = mu + areaPx * rn2;
    if (!(variance > 0)) continue;
    grad[0] = areaPx * d[2]!;
    if (m > 1) {
      grad[1] = areaPx * d[1]!;
      grad[2] = areaPx * d[3]!;
      let q = 3;
      if (fitEta) grad[q++] = areaPx * d[4]!;
      grad[q++] = areaPx;
      grad[q] = areaPx * (r - R);
    }
    for (let a = 0; a < m; a++) for (let b = a; b < m; b++) fim[a * m + b] += (grad[a]! * grad[b]!) / variance;
  }
  for (let a = 0; a < m; a++) for (let b = 0; b < a; b++) fim[a * m + b] = fim[b * m + a]!;
  if (m === 1) return fim[0]! > 0 ? 1 / Math.sqrt(fim[0]!) : Infinity;
  // Invert with the diagonal scaled to 1 (the parameters differ in scale by many decades).
  const scale = Float64Array.from({ length: m }, (_, a) => 1 / Math.sqrt(fim[a * m + a]!));
  if (!scale.every((x) => Number.isFinite(x))) return Infinity;
  for (let a = 0; a < m; a++) for (let b = 0; b < m; b++) fim[a * m + b] *= scale[a]! * scale[b]!;
  const inv = invertSymmetric(fim, m);
  if (inv === null || !(inv[0]! > 0)) return Infinity;
  return Math.sqrt(inv[0]!) * scale[0]!;
}
