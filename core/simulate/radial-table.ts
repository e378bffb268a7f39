/**
 * A function of corrected radius tabulated at R_i = startPx + i h and read back by
 * linear interpolation. The simulator sums every radially symmetric part of a pattern
 * (background, halos, direct beam, ring profiles) into one such table, so each image
 * sample costs one square root, one multiply and two reads.
 *
 * Interpolation error: for a peak of FWHM Gamma and unit height the linear interpolant
 * is off by at most h^2 |f''| / 8, i.e. (h / Gamma)^2 for a Lorentzian (f''(0) = -8 / Gamma^2)
 * and ln 2 (h / Gamma)^2 for a Gaussian; with the simulator's h <= Gamma / 64 that is
 * below 2.5e-4 of the peak, and symmetric about the peak, so ring positions do not move.
 */

export interface RadialTable {
  startPx: number;
  stepPx: number;
  values: Float64Array;
}

/** Tabulates `f` at `count` (>= 2) nodes from `startPx` in steps of `stepPx` (> 0). */
export function tabulateRadial(startPx: number, stepPx: number, count: number, f: (radiusPx: number) => number): RadialTable {
  if (!(stepPx > 0)) throw new RangeError(`stepPx must be > 0; got ${stepPx}`);
  if (!Number.isInteger(count) || count < 2) throw new RangeError(`count must be an integer >= 2; got ${count}`);
  const values = new Float64Array(count);
  for (let i = 0; i < count; i++) values[i] = f(startPx + i * stepPx);
  return { startPx, stepPx, values };
}

/** Interpolated value at `radiusPx`; 0 outside [startPx, last node]. */
export function radialTableValue(table: RadialTable, radiusPx: number): number {
  const u = (radiusPx - table.startPx) / table.stepPx;
  if (!(u >= 0)) return 0;
  const i = Math.floor(u);
  const last = table.values.length - 1;
  if (i >= last) return i === last && u === last ? table.values[last]! : 0;
  return table.values[i]! + (u - i) * (table.values[i + 1]! - table.values[i]!);
}
