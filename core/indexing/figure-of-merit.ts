/**
 * Published figures of merit for an indexed set of rings. Both count the
 * calculated lines the cell predicts up to the N-th indexed ring, so a large
 * cell that "explains" rings by having a line everywhere scores low.
 *
 * de Wolff (P. M. de Wolff, "A simplified criterion for the reliability of a
 * powder pattern indexing", J. Appl. Cryst. 1 (1968) 108-113), computed in
 * Q = 1/d^2 as de Wolff defines it:
 *
 *   M_N = Q_N / (2 <|dQ|> N_calc)
 *
 *   Q_N     Q of the N-th indexed ring (rings in order of increasing Q; de Wolff uses N = 20)
 *   <|dQ|>  mean |Q_obs - Q_calc| over those N rings
 *   N_calc  number of distinct calculated Q up to Q_N
 *
 * Smith & Snyder (G. S. Smith and R. L. Snyder, "F_N: a criterion for rating
 * powder diffraction patterns and evaluating the reliability of
 * powder-pattern indexing", J. Appl. Cryst. 12 (1979) 60-65) define
 * F_N = (1 / <|d2theta|>) (N / N_poss) in degrees of 2theta. Electron
 * diffraction angles are small, 2theta ~ lambda / d (radians), so
 * |d2theta| ~ lambda |d(1/d)|. We use |d(1/d)| (1/Å) in place of |d2theta|:
 *
 *   F_N (Å) = N / (N_poss <|1/d_obs - 1/d_calc|>)
 *
 * which is independent of the beam energy; the conventional value in
 * 1/degree is F_N (Å) / (lambda (Å) * 180 / pi).
 *
 * Here, as is common practice when some rings stay unindexed, N counts the
 * indexed rings only (at most `nMax`, 20 by default) and Q_N is the largest
 * of them; unindexed rings are reported separately by the caller.
 */

export interface IndexedLine {
  /** Observed Q = 1/d^2, 1/Å^2. */
  qObsPerA2: number;
  /** Q of the calculated line the ring is assigned to, 1/Å^2. */
  qCalcPerA2: number;
}

export interface DeWolffFigure {
  /** M_N, dimensionless. */
  value: number;
  /** N: indexed rings used. */
  n: number;
  /** Distinct calculated lines up to Q_N. */
  nCalculated: number;
  /** Mean |Q_obs - Q_calc|, 1/Å^2 (after the round-off floor below). */
  meanAbsDeltaQPerA2: number;
}

export interface SmithSnyderFigure {
  /** F_N in Å (see the header for the conversion to 1/degree of 2theta). */
  valueA: number;
  n: number;
  /** Distinct calculated lines up to the N-th indexed ring. */
  nPossible: number;
  /** Mean |1/d_obs - 1/d_calc|, 1/Å. */
  meanAbsDeltaInverseDPerA: number;
}

/**
 * Mean discrepancies below this fraction of the largest value cannot be told
 * from floating-point round-off; they are raised to it so that exact
 * synthetic data give a large finite figure instead of Infinity.
 */
const ROUND_OFF_RELATIVE = 1e-12;

function firstIndexed(lines: readonly IndexedLine[], nMax: number): IndexedLine[] {
  if (!(Number.isInteger(nMax) && nMax >= 1)) throw new RangeError(`nMax must be a positive integer; got ${nMax}`);
  return [...lines].sort((x, y) => x.qObsPerA2 - y.qObsPerA2).slice(0, nMax);
}

/** Distinct values of a list of positions up to `limit`, counting values within 1e-9 relative once. */
function countDistinctUpTo(positions: readonly number[], limit: number): number {
  const below = positions.filter((q) => q <= limit * (1 + 1e-9)).sort((x, y) => x - y);
  let count = 0;
  let last = -Infinity;
  for (const q of below) {
    if (q > last * (1 + 1e-9)) count++;
    last = q;
  }
  return count;
}

/**
 * de Wolff's M_N.
 * @param lines indexed rings, any order; not mutated
 * @param calculatedQPerA2 Q of every line the cell predicts (at least up to the N-th ring), any order
 * @param nMax the N of M_N at most (20 by default, as de Wolff proposes)
 * @returns null when fewer than 2 rings are indexed (M_N is then meaningless)
 */
export function deWolffM(lines: readonly IndexedLine[], calculatedQPerA2: readonly number[], nMax = 20): DeWolffFigure | null {
  const used = firstIndexed(lines, nMax);
  if (used.length < 2) return null;
  const last = used[used.length - 1]!;
  // Count the line the N-th ring is assigned to even when it lies just above Q_N.
  const qN = last.qObsPerA2;
  const nCalculated = Math.max(1, countDistinctUpTo(calculatedQPerA2, Math.max(qN, last.qCalcPerA2)));
  const meanAbs = Math.max(
    used.reduce((s, l) => s + Math.abs(l.qObsPerA2 - l.qCalcPerA2), 0) / used.length,
    ROUND_OFF_RELATIVE * qN,
  );
  return { value: qN / (2 * meanAbs * nCalculated), n: used.length, nCalculated, meanAbsDeltaQPerA2: meanAbs };
}

/**
 * Smith & Snyder's F_N adapted to 1/d (see the header).
 * @param lines indexed rings, any order; not mutated
 * @param calculatedQPerA2 Q of every line the cell predicts, any order
 * @returns null when fewer than 2 rings are indexed
 */
export function smithSnyderF(lines: readonly IndexedLine[], calculatedQPerA2: readonly number[], nMax = 20): SmithSnyderFigure | null {
  const used = firstIndexed(lines, nMax);
  if (used.length < 2) return null;
  const last = used[used.length - 1]!;
  const nPossible = Math.max(1, countDistinctUpTo(calculatedQPerA2, Math.max(last.qObsPerA2, last.qCalcPerA2)));
  const meanAbs = Math.max(
    used.reduce((s, l) => s + Math.abs(Math.sqrt(l.qObsPerA2) - Math.sqrt(l.qCalcPerA2)), 0) / used.length,
    ROUND_OFF_RELATIVE * Math.sqrt(last.qObsPerA2),
  );
  return { valueA: used.length / (nPossible * meanAbs), n: used.length, nPossible, meanAbsDeltaInverseDPerA: meanAbs };
}
