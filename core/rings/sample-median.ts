/**
 * Medians and order statistics for robust statistics in the geometry steps
 * (noise scales, outlier rules), exact: the value a full numeric sort would put
 * at that rank, found by selection instead of sorting (Hoare's partition with
 * Wirth's stopping rule and a median-of-three pivot: C. A. R. Hoare, Comm. ACM 4
 * (1961) 321, Algorithm 65 FIND; N. Wirth, Algorithms + Data Structures =
 * Programs, 1976). Expected O(n) against O(n log n) for the sort; the arrays are
 * reordered, not sorted. An array holding a NaN is sorted instead (the
 * typed-array sort puts NaN last, and the ranks keep that meaning).
 */

/** True when some element is NaN. */
function hasNaN(values: Float64Array, lo: number, hi: number): boolean {
  for (let k = lo; k < hi; k++) if (values[k] !== values[k]) return true;
  return false;
}

/**
 * The k-th smallest of values[lo..hi) (k counted from 0 over the whole array, lo <= k < hi),
 * with the range reordered so that values[lo..k) <= values[k] <= values(k..hi). NaN-free input.
 */
function selectRange(a: Float64Array, k: number, lo: number, hi: number): number {
  let l = lo, r = hi - 1;
  while (l < r) {
    const m = (l + r) >>> 1;
    // Median of three as the pivot value (always an element of the range, so the scans stop).
    const x0 = a[l]!, x1 = a[m]!, x2 = a[r]!;
    const x = x0 < x1 ? (x1 < x2 ? x1 : x0 < x2 ? x2 : x0) : x0 < x2 ? x0 : x1 < x2 ? x2 : x1;
    let i = l, j = r;
    do {
      while (a[i]! < x) i++;
      while (x < a[j]!) j--;
      if (i <= j) {
        const t = a[i]!;
        a[i] = a[j]!;
        a[j] = t;
        i++;
        j--;
      }
    } while (i <= j);
    // Now a[l..j] <= x <= a[i..r], and a(j..i) == x.
    if (j < k) l = i;
    if (k < i) r = j;
  }
  return a[k]!;
}

/**
 * The element of rank `rank` (0 = smallest) that a numeric sort of `values` would give;
 * `values` is reordered in place (elements of lower rank before it, higher after).
 * @throws RangeError for a rank outside [0, length)
 */
export function selectInPlace(values: Float64Array, rank: number): number {
  const n = values.length;
  if (!Number.isInteger(rank) || rank < 0 || rank >= n) throw new RangeError(`rank must be an integer in [0, ${n}); got ${rank}`);
  if (hasNaN(values, 0, n)) {
    values.sort();
    return values[rank]!;
  }
  return selectRange(values, rank, 0, n);
}

/**
 * The elements of ranks lo <= hi (0 = smallest) that a numeric sort of `values` would give,
 * by two selections (the second over the part above the first); `values` is reordered.
 * @throws RangeError unless 0 <= lo <= hi < length are integers
 */
export function selectTwoInPlace(values: Float64Array, lo: number, hi: number): [number, number] {
  const n = values.length;
  if (!Number.isInteger(lo) || !Number.isInteger(hi) || lo < 0 || hi < lo || hi >= n) throw new RangeError(`ranks must be integers with 0 <= lo <= hi < ${n}; got ${lo}, ${hi}`);
  if (hasNaN(values, 0, n)) {
    values.sort();
    return [values[lo]!, values[hi]!];
  }
  const a = selectRange(values, lo, 0, n);
  return [a, hi === lo ? a : selectRange(values, hi, lo + 1, n)];
}

/** Median of `values`, which are reordered in place. NaN for an empty array. */
export function medianInPlace(values: Float64Array): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  if (hasNaN(values, 0, n)) {
    values.sort();
    return n % 2 ? values[(n - 1) >> 1]! : 0.5 * (values[n / 2 - 1]! + values[n / 2]!);
  }
  if (n % 2) return selectRange(values, (n - 1) >> 1, 0, n);
  // Even count: the mean of ranks n/2 - 1 and n/2; the second is the smallest above the first.
  const a = selectRange(values, n / 2 - 1, 0, n);
  let b = Infinity;
  for (let k = n / 2; k < n; k++) if (values[k]! < b) b = values[k]!;
  return 0.5 * (a + b);
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
