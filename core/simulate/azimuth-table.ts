/**
 * A function of azimuth tabulated at n equally spaced nodes phi_j = -pi + 2 pi j / n
 * (j = 0..n-1) and read back by periodic linear interpolation. The simulator keeps each
 * ring's azimuthal modulation (texture, grain spots) this way, so no transcendental
 * function is evaluated per image sample.
 *
 * The integral over a turn of the linear interpolant equals (2 pi / n) times the sum of
 * the node values, so scaling the nodes to mean 1 (normaliseAzimuthTableMean) makes the
 * modulation conserve the ring's azimuthal mean exactly, whatever n.
 */

export interface AzimuthTable {
  /** Node values; values[j] belongs to phi_j = -pi + 2 pi j / n. */
  values: Float64Array;
}

/** Tabulates `f` (azimuth in radians) at `nodeCount` (>= 4) nodes. */
export function tabulateAzimuth(nodeCount: number, f: (azimuthRad: number) => number): AzimuthTable {
  if (!Number.isInteger(nodeCount) || nodeCount < 4) throw new RangeError(`nodeCount must be an integer >= 4; got ${nodeCount}`);
  const values = new Float64Array(nodeCount);
  for (let j = 0; j < nodeCount; j++) values[j] = f(-Math.PI + (2 * Math.PI * j) / nodeCount);
  return { values };
}

/** Scales the table in place so the mean of its nodes (and so of its interpolant over a turn) is 1; throws if the mean is not > 0. */
export function normaliseAzimuthTableMean(table: AzimuthTable): void {
  let sum = 0;
  for (const v of table.values) sum += v;
  const mean = sum / table.values.length;
  if (!(mean > 0) || !Number.isFinite(mean)) throw new RangeError(`azimuthal modulation must have a positive finite mean; got ${mean}`);
  for (let j = 0; j < table.values.length; j++) table.values[j] = table.values[j]! / mean;
}

/** The interpolated value at `azimuthRad` (any real angle; reduced modulo 2 pi). */
export function azimuthTableValue(table: AzimuthTable, azimuthRad: number): number {
  const n = table.values.length;
  let u = ((azimuthRad + Math.PI) * n) / (2 * Math.PI);
  u -= n * Math.floor(u / n);
  let j = Math.floor(u);
  const f = u - j;
  if (j >= n) j -= n;
  const next = j + 1 === n ? 0 : j + 1;
  return table.values[j]! + f * (table.values[next]! - table.values[j]!);
}
