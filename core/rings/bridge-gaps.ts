/**
 * Profiles have empty bins (behind a mask, beyond the image): steps that need a
 * value in every bin bridge them.
 */

/**
 * Copy of `values` with each run of non-finite entries replaced by the straight
 * line between its finite neighbours, or by the nearer neighbour's value at the
 * ends; null when nothing is finite.
 */
export function bridgeGaps(values: ArrayLike<number>): Float64Array | null {
  const n = values.length;
  const out = new Float64Array(n);
  let prev = -1;
  for (let i = 0; i < n; i++) {
    const v = values[i]!;
    if (!Number.isFinite(v)) continue;
    out[i] = v;
    if (prev === -1) for (let k = 0; k < i; k++) out[k] = v;
    else if (i - prev > 1) {
      const a = out[prev]!;
      for (let k = prev + 1; k < i; k++) out[k] = a + ((v - a) * (k - prev)) / (i - prev);
    }
    prev = i;
  }
  if (prev === -1) return null;
  for (let k = prev + 1; k < n; k++) out[k] = out[prev]!;
  return out;
}
