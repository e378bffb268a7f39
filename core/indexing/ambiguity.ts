/**
 * Equivalent answers: two candidates that the data cannot tell apart, said
 * plainly instead of one being picked silently.
 *
 * Two candidates are equivalent on the data when (1) they explain exactly the
 * same rings and (2) their predicted ring positions coincide, within the
 * tolerance below, for every line up to the largest measured Q. The classic
 * case is a primitive cubic cell of edge a against a body-centred one of edge
 * a sqrt(2): Q = N / a^2 with N = 1, 2, 3, 4, 5, 6, 8, ... (cP) and
 * Q = N' / (2 a^2) with N' = 2, 4, 6, ..., 12, 14, ... (cI) agree until cI's
 * N' = 14, where cP has nothing (7 is no sum of three squares). The d of the
 * first line that only one of them predicts is the measurement that would
 * decide.
 */

import { lowerBound } from './ring-pattern-evidence';

export interface Ambiguity {
  /** Positions of the two candidates in the returned candidate list, best first. */
  candidates: [number, number];
  reason: string;
  /** d of the first ring (largest d beyond the equivalence) that only one of them predicts, Å; null if none was found within 8x the measured Q range. */
  decidingDA: number | null;
}

/** What the detector needs to know of a candidate. */
export interface AmbiguityInput {
  /** Short human label, e.g. "cP a = 3.0000(6) Å". */
  label: string;
  /** Indices (into the caller's ring array) of the rings the candidate explains. */
  explainedRingIndices: readonly number[];
  /** Predicted line positions Q = 1/d^2 up to qMaxPerA2, ascending. */
  linesQ(qMaxPerA2: number): number[];
  /** Relative standard uncertainty of the candidate's length scale (sigma_a / a). */
  relativeSigma: number;
}

export interface AmbiguityOptions {
  /** Lines coincide when their Q differ by at most this many combined sigmas (3 by default). */
  toleranceSigmas?: number;
  /** ...or by this relative amount in d, whichever is larger (5e-4 by default, the indexer's window floor). */
  floorRelative?: number;
}

function sameSet(a: readonly number[], b: readonly number[]): boolean {
  if (a.length !== b.length) return false;
  const sa = [...a].sort((x, y) => x - y);
  const sb = [...b].sort((x, y) => x - y);
  return sa.every((v, i) => v === sb[i]);
}

/** True when some line of `lines` lies within relTol (relative in Q) of q. */
function hasPartner(lines: readonly number[], q: number, relTol: number): boolean {
  const i = lowerBound(lines, q * (1 - relTol));
  return i < lines.length && lines[i]! <= q * (1 + relTol);
}

/**
 * First Q (ascending) at which a line of one list has no partner in the other.
 * @returns the Q and which list ('a' or 'b') holds the unpartnered line, or null
 */
export function firstDifference(
  linesA: readonly number[],
  linesB: readonly number[],
  relTol: number,
): { qPerA2: number; onlyIn: 'a' | 'b' } | null {
  const firstA = linesA.find((q) => !hasPartner(linesB, q, relTol));
  const firstB = linesB.find((q) => !hasPartner(linesA, q, relTol));
  if (firstA === undefined && firstB === undefined) return null;
  if (firstB === undefined || (firstA !== undefined && firstA <= firstB)) return { qPerA2: firstA!, onlyIn: 'a' };
  return { qPerA2: firstB, onlyIn: 'b' };
}

/** firstDifference over lines up to qMax; lines are fetched a little further so one near the edge still finds its partner. */
function differenceUpTo(a: AmbiguityInput, b: AmbiguityInput, qMax: number, relTol: number): ReturnType<typeof firstDifference> {
  const fetch = qMax * (1 + 2 * relTol);
  const found = firstDifference(a.linesQ(fetch), b.linesQ(fetch), relTol);
  return found !== null && found.qPerA2 <= qMax ? found : null;
}

/**
 * Every pair of equivalent candidates among `candidates` (indices i < j).
 * @param candidates in the order they will be reported
 * @param qMaxObsPerA2 largest measured Q (1/d_min^2)
 */
export function findAmbiguities(
  candidates: readonly AmbiguityInput[],
  qMaxObsPerA2: number,
  options: AmbiguityOptions = {},
): Ambiguity[] {
  const kSigma = options.toleranceSigmas ?? 3;
  const floor = options.floorRelative ?? 5e-4;
  const out: Ambiguity[] = [];
  for (let i = 0; i < candidates.length; i++) {
    for (let j = i + 1; j < candidates.length; j++) {
      const a = candidates[i]!;
      const b = candidates[j]!;
      if (!sameSet(a.explainedRingIndices, b.explainedRingIndices)) continue;
      // Q = 1/d^2: a relative tolerance in d doubles in Q.
      const relTol = 2 * Math.max(kSigma * Math.hypot(a.relativeSigma, b.relativeSigma), floor);
      if (differenceUpTo(a, b, qMaxObsPerA2 * (1 + relTol), relTol) !== null) continue;
      const beyond = differenceUpTo(a, b, qMaxObsPerA2 * 8, relTol);
      const decidingDA = beyond === null ? null : 1 / Math.sqrt(beyond.qPerA2);
      const predictor = beyond === null ? '' : beyond.onlyIn === 'a' ? a.label : b.label;
      const dMin = 1 / Math.sqrt(qMaxObsPerA2);
      const reason =
        `${a.label} and ${b.label} explain the same ${a.explainedRingIndices.length} rings and predict the same ring positions ` +
        `down to the smallest measured d (${dMin.toFixed(4)} Å), so the data cannot tell them apart` +
        (decidingDA === null
          ? '.'
          : `; the first ring that would is at d = ${decidingDA.toFixed(4)} Å, predicted only by ${predictor}.`);
      out.push({ candidates: [i, j], reason, decidingDA });
    }
  }
  return out;
}
