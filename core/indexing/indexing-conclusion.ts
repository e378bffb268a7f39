/**
 * Whether an indexing result is an answer at all. A ranked list always has a
 * first entry, even for rings no lattice explains; this says when that first
 * entry should not be read as the phase.
 *
 * Rule (Annula's own judgement, not a published standard): the best candidate
 * must explain at least 3 rings and at least two thirds of the measured rings.
 * Fewer than 3 explained rings fix a cubic a and a lattice type only by chance
 * (any two d-spacings fit some cubic cell), and a candidate that leaves more
 * than a third of the rings unexplained describes at most part of the film.
 */
import type { MeasuredRing } from './measured-ring';

export interface IndexingConclusion {
  conclusive: boolean;
  /** Why not, in words a user can act on; empty when conclusive. */
  reason: string;
}

export const MIN_EXPLAINED_RINGS = 3;
export const MIN_EXPLAINED_FRACTION = 2 / 3;

/**
 * @param rings the measured rings
 * @param bestExplained how many rings the best candidate explains, or null when there is none
 */
export function judgeIndexing(rings: readonly MeasuredRing[], bestExplained: number | null): IndexingConclusion {
  if (bestExplained === null) {
    return { conclusive: false, reason: 'no cubic lattice or phase explains these rings' };
  }
  if (bestExplained < MIN_EXPLAINED_RINGS) {
    return {
      conclusive: false,
      reason: `the best candidate explains only ${bestExplained} ring${bestExplained === 1 ? '' : 's'}; at least ${MIN_EXPLAINED_RINGS} are needed before a cubic lattice is more than a coincidence (measure more rings)`,
    };
  }
  if (bestExplained < MIN_EXPLAINED_FRACTION * rings.length) {
    return {
      conclusive: false,
      reason: `the best candidate explains ${bestExplained} of ${rings.length} rings; with more than a third unexplained it describes at most part of the film (check the d-spacings, their uncertainty, or look for a mixture)`,
    };
  }
  return { conclusive: true, reason: '' };
}

/**
 * Pairs of rings whose d agree within their combined standard uncertainty:
 * probably one ring measured twice. Returned as notes, not errors.
 */
export function duplicateRingNotes(rings: readonly MeasuredRing[]): string[] {
  const notes: string[] = [];
  for (let i = 0; i < rings.length; i++) {
    for (let j = i + 1; j < rings.length; j++) {
      const a = rings[i]!;
      const b = rings[j]!;
      if (Math.abs(a.dA - b.dA) <= Math.hypot(a.dSigmaA, b.dSigmaA)) {
        notes.push(`rings ${i + 1} and ${j + 1} (d = ${a.dA.toFixed(4)} and ${b.dA.toFixed(4)} Å) agree within their uncertainties: the same ring entered twice?`);
      }
    }
  }
  return notes;
}
