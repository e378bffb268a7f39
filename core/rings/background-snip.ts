/**
 * Background of a radial profile by SNIP, the statistics-sensitive non-linear
 * iterative peak-clipping algorithm (C. G. Ryan, E. Clayton, W. L. Griffin,
 * S. H. Sie and D. R. Cousens, Nucl. Instrum. Methods B34 (1988) 396), with the
 * LLS (log-log-square-root) operator that M. Morhac, J. Kliman, V. Matousek,
 * M. Veselsky and I. Turzo (Nucl. Instrum. Methods A401 (1997) 113) apply to
 * counts before clipping:
 *
 *   LLS:      v = ln(ln(sqrt(y + 1) + 1) + 1)
 *   clip p:   v_i <- min(v_i, (v_{i-p} + v_{i+p}) / 2)     for p = 1, 2, ..., m
 *   inverse:  y = (exp(exp(v) - 1) - 1)^2 - 1
 *
 * A feature survives when it is broad compared with the largest clipping
 * half-window m: a peak whose base is narrower than about 2m is clipped to the
 * line joining its flanks. The second-order filter above also clips a curved
 * (concave) background a little at every pass, about m^3 |v''| / 6 in all (v''
 * in bins^-2), so a halo's top sinks as the window grows; the fourth-order
 * filter (filterOrder 4, below) is exact for cubics and leaves a halo alone,
 * but needs twice the window for the same peak. measure-rings.ts uses order 4
 * with m = 4 FWHM of the rings: sharp rings are removed and the broad halos of
 * an amorphous support film stay in the background (the unit tests measure
 * both). Near the ends the window shrinks to what the data allow
 * (p_i = min(p, i, n - 1 - i)), so the first and last bins are never clipped
 * (with the fourth-order filter, the first and last two).
 *
 * The LLS operator is built for counts: values below zero are shifted up by the
 * minimum first (and back after), and its compression depends on the scale of
 * the values. Pass `transform: 'none'` to clip the values as they are.
 */

import { bridgeGaps } from './bridge-gaps';

export interface SnipOptions {
  /** Largest clipping half-window m, in bins (integer >= 1). */
  windowBins: number;
  /** 'lls' (default): clip in the LLS domain; 'none': clip the values directly. */
  transform?: 'lls' | 'none';
  /** 'increasing' (default, p = 1..m as Ryan et al.) or 'decreasing' (p = m..1). */
  order?: 'increasing' | 'decreasing';
  /**
   * Order of the clipping filter: 2 (default), the mean of the two neighbours at +-p; or 4,
   * which clips to the larger of that mean and the cubic estimate
   * (-v_{i-p} + 4 v_{i-p/2} + 4 v_{i+p/2} - v_{i+p}) / 6, exact for any cubic and so
   * blind to the curvature of a broad halo (M. Morhac and V. Matousek, Appl. Spectrosc.
   * 62 (2008) 91; from memory).
   */
  filterOrder?: 2 | 4;
}

/** LLS operator of Morhac et al. (1997): ln(ln(sqrt(y + 1) + 1) + 1), for y >= 0. */
export function llsForward(y: number): number {
  return Math.log(Math.log(Math.sqrt(y + 1) + 1) + 1);
}

/** Inverse of llsForward: (exp(exp(v) - 1) - 1)^2 - 1. */
export function llsInverse(v: number): number {
  const e = Math.exp(Math.exp(v) - 1) - 1;
  return e * e - 1;
}

/**
 * SNIP background of `values` (one per bin, equally spaced).
 * Non-finite entries (empty bins) are bridged by linear interpolation between
 * their finite neighbours (held constant beyond the first and last), and the
 * background is returned there too. All-non-finite input returns all NaN.
 * @param values the profile, e.g. RadialProfile.mean (not mutated)
 * @throws RangeError when windowBins is not an integer >= 1
 */
export function snipBackground(values: ArrayLike<number>, options: SnipOptions): Float64Array {
  const m = options.windowBins;
  if (!Number.isInteger(m) || m < 1) throw new RangeError(`windowBins must be an integer >= 1; got ${m}`);
  const transform = options.transform ?? 'lls';
  const order = options.order ?? 'increasing';
  if (transform !== 'lls' && transform !== 'none') throw new RangeError(`transform must be 'lls' or 'none'; got ${String(transform)}`);
  if (order !== 'increasing' && order !== 'decreasing') throw new RangeError(`order must be 'increasing' or 'decreasing'; got ${String(order)}`);
  const filterOrder = options.filterOrder ?? 2;
  if (filterOrder !== 2 && filterOrder !== 4) throw new RangeError(`filterOrder must be 2 or 4; got ${String(filterOrder)}`);
  const n = values.length;
  const y = bridgeGaps(values);
  if (y === null) return new Float64Array(n).fill(Number.NaN);

  let shift = 0;
  if (transform === 'lls') {
    let min = Infinity;
    for (let i = 0; i < n; i++) if (y[i]! < min) min = y[i]!;
    shift = min < 0 ? -min : 0;
    for (let i = 0; i < n; i++) y[i] = llsForward(y[i]! + shift);
  }
  const work = new Float64Array(n);
  for (let step = 1; step <= m; step++) {
    const p = order === 'increasing' ? step : m + 1 - step;
    work.set(y);
    for (let i = 1; i < n - 1; i++) {
      const q = Math.min(p, i, n - 1 - i);
      let mid = 0.5 * (work[i - q]! + work[i + q]!);
      if (filterOrder === 4) {
        if (q < 2) continue; // no cubic estimate next to the ends: leave those bins as they are
        const h = q >> 1;
        const cubic = (4 * (work[i - h]! + work[i + h]!) - work[i - 2 * h]! - work[i + 2 * h]!) / 6;
        if (cubic > mid) mid = cubic;
      }
      if (mid < y[i]!) y[i] = mid;
    }
  }
  if (transform === 'lls') for (let i = 0; i < n; i++) y[i] = llsInverse(y[i]!) - shift;
  return y;
}
