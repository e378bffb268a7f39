/**
 * How the report names each measured ring: its hkl when the analysis indexed
 * it; '(hkl)' when the analysis left it unindexed because the indexing was not
 * conclusive but the best candidate does assign it (a tentative index, shown
 * so a reviewer can see which rings that candidate claims); '#n' (its number in
 * the ring table) when no candidate explains it.
 */
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';
import { hklText } from './number-text';

export interface RingLabel {
  text: string;
  /** Indexed by the analysis or assigned by its best candidate. */
  explained: boolean;
  /** Assigned by the best candidate only (the analysis did not adopt it). */
  tentative: boolean;
}

export function ringLabel(result: AnalysisResult, ringIndex: number): RingLabel {
  const ring = result.rings[ringIndex];
  if (!ring) throw new RangeError(`ringIndex ${ringIndex} is not a ring of the analysis (it has ${result.rings.length})`);
  if (ring.hkl) return { text: hklText(ring.hkl), explained: true, tentative: false };
  const assigned = result.candidates[0]?.assignments.find((a) => a.ringIndex === ringIndex);
  if (assigned) return { text: `(${hklText(assigned.hkl)})`, explained: true, tentative: true };
  return { text: `#${ringIndex + 1}`, explained: false, tentative: false };
}
