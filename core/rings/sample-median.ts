/**
 * Medians for robust statistics in the geometry steps (noise scales, outlier
 * rules). Typed-array sort is numeric, so these are plain and exact.
 */

/** Median of `values`, which are sorted in place. NaN for an empty array. */
export function medianInPlace(values: Float64Array): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  values.sort();
  return n % 2 ? values[(n - 1) >> 1]! : 0.5 * (values[n / 2 - 1]! + values[n / 2]!);
}

/** Median of any numbers (not mutated). NaN for none. */
export function medianOf(values: ArrayLike<number>): number {
  return medianInPlace(Float64Array.from(values));
}

/**
 * Robust standard deviation, 1.4826 * median(|x - median(x)|): the MAD scaled to
 * equal sigma for normally distributed data (common practice). NaN for none.
 */
export function robustSigmaOf(values: ArrayLike<number>): number {
  const v = Float64Array.from(values);
  const m = medianInPlace(v);
  for (let k = 0; k < v.length; k++) v[k] = Math.abs(v[k]! - m);
  return 1.4826 * medianInPlace(v);
}
