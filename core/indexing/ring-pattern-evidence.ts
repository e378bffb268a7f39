/**
 * How much better a set of predicted lines explains the measured rings than
 * rings scattered at random: a log-likelihood ratio, in nats, used to rank
 * candidate cells and phases.
 *
 * Model (a two-component "good data plus outliers" mixture, the usual way to
 * let a few rings be spurious; see e.g. D. S. Sivia and J. Skilling, Data
 * Analysis: A Bayesian Tutorial, 2nd ed., OUP 2006, on outliers in least
 * squares -- cited from memory): each ring is,
 * with probability 1 - eps, drawn from one of the cell's K lines up to the
 * largest measured Q, line l picked with probability p_l (1/K when no
 * intensities are known), and measured with a Gaussian error sigma_Q; with
 * probability eps it is spurious, uniform on (0, Q_top]. Against the
 * reference model "every ring uniform on (0, Q_top]", ring j contributes
 *
 *   ln( (1 - eps) Q_top sum_l p_l phi((Q_j - Q_l) / s_j) / s_j + eps ),
 *
 * phi the standard normal density. A cell that predicts a line everywhere
 * (a large cell, or a primitive cell where a centred one would do) pays
 * through p_l = 1/K on every ring; a ring no line explains costs ln(eps).
 * So, unlike a plain count of explained rings, one extra ring explained by
 * chance does not outweigh a pattern that fits with half as many lines.
 */

export interface ObservedQ {
  qPerA2: number;
  /** Gaussian width used for this ring, 1/Å^2 (the caller applies any floor). */
  qSigmaPerA2: number;
}

/** phi(u) = exp(-u^2 / 2) / sqrt(2 pi). */
const INV_SQRT_2PI = 1 / Math.sqrt(2 * Math.PI);

/** Lines further than this many sigma from a ring add less than 1e-8 of phi(0): skipped. */
const REACH_SIGMAS = 6;

/** Index of the first element >= value in an ascending array. */
export function lowerBound(sorted: readonly number[], value: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid]! < value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Log-likelihood ratio of the mixture model above against random rings, nats.
 * @param observed measured rings (any order), each with its Q sigma (> 0)
 * @param linesQPerA2 predicted line positions, ascending; lines beyond Q_top are ignored
 * @param spuriousFraction eps, in (0, 1)
 * @param lineWeights optional relative weights of the lines (same order, >= 0); normalised over the lines up to Q_top
 */
export function ringPatternEvidence(
  observed: readonly ObservedQ[],
  linesQPerA2: readonly number[],
  spuriousFraction: number,
  lineWeights?: readonly number[],
): number {
  if (!(spuriousFraction > 0 && spuriousFraction < 1)) {
    throw new RangeError(`spuriousFraction must lie strictly between 0 and 1; got ${spuriousFraction}`);
  }
  if (lineWeights && lineWeights.length !== linesQPerA2.length) {
    throw new RangeError(`lineWeights must have one weight per line (${linesQPerA2.length}); got ${lineWeights.length}`);
  }
  if (observed.length === 0) return 0;
  let qTop = 0;
  for (const o of observed) qTop = Math.max(qTop, o.qPerA2 + 3 * o.qSigmaPerA2);
  const k = lowerBound(linesQPerA2, qTop * (1 + 1e-12));
  if (k === 0) return observed.length * Math.log(spuriousFraction);
  let weightSum = k;
  if (lineWeights) {
    weightSum = 0;
    for (let l = 0; l < k; l++) weightSum += lineWeights[l]!;
    if (!(weightSum > 0)) return observed.length * Math.log(spuriousFraction);
  }
  let total = 0;
  for (const o of observed) {
    const s = o.qSigmaPerA2;
    let density = 0;
    const from = lowerBound(linesQPerA2, o.qPerA2 - REACH_SIGMAS * s);
    for (let l = from; l < k && linesQPerA2[l]! <= o.qPerA2 + REACH_SIGMAS * s; l++) {
      const u = (o.qPerA2 - linesQPerA2[l]!) / s;
      const p = lineWeights ? lineWeights[l]! / weightSum : 1 / weightSum;
      density += (p * INV_SQRT_2PI * Math.exp(-0.5 * u * u)) / s;
    }
    total += Math.log((1 - spuriousFraction) * qTop * density + spuriousFraction);
  }
  return total;
}
