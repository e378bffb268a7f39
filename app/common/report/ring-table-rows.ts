/**
 * The ring table as rows for a CSV file: one row per measured ring, the same
 * rings and names as the PDF's ring table (analysis-report.ts), with the best
 * candidate's calculated d and residual beside the measured d.
 *
 * Columns (units in the names): ring (1-based, the report's ring number),
 * radiusPx and radiusSigmaPx (corrected radius, the geometric mean of the ellipse
 * semi-axes, and its standard uncertainty), radiusBoundPx (the photon-counting
 * limit of that radius, empty when not computed), dA and dSigmaA (Å, exact
 * flat-detector geometry, camera uncertainty included), dCalcA and residualSigma
 * (the best candidate's d for the ring and (d - dCalc) / sigma(d); empty when it
 * does not claim the ring), fwhmPx, intensity, snr, continuity (0-1), spottiness,
 * textureAmplitude, hkl ('1 1 1'; empty when not indexed), tentativeHkl (the best
 * candidate's indices when the analysis did not adopt them), phase.
 * Empty input (no rings) gives no rows; nothing is mutated.
 */
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';

export const RING_TABLE_COLUMNS = [
  'ring',
  'radiusPx',
  'radiusSigmaPx',
  'radiusBoundPx',
  'dA',
  'dSigmaA',
  'dCalcA',
  'residualSigma',
  'fwhmPx',
  'intensity',
  'snr',
  'continuity',
  'spottiness',
  'textureAmplitude',
  'hkl',
  'tentativeHkl',
  'phase',
] as const;

export type RingTableRow = Record<(typeof RING_TABLE_COLUMNS)[number], string | number | null>;

const finite = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v);

export function ringTableRows(result: AnalysisResult): RingTableRow[] {
  const best = result.candidates[0];
  const byRing = new Map((best?.assignments ?? []).map((a) => [a.ringIndex, a]));
  return result.rings.map((r, i) => {
    const a = byRing.get(i);
    return {
      ring: i + 1,
      radiusPx: finite(r.radiusPx),
      radiusSigmaPx: finite(r.radiusSigmaPx),
      radiusBoundPx: finite(r.radiusBoundPx),
      dA: finite(r.dA),
      dSigmaA: finite(r.dSigmaA),
      dCalcA: a ? finite(a.dCalcA) : null,
      residualSigma: a ? finite(a.residualSigma) : null,
      fwhmPx: finite(r.fwhmPx),
      intensity: finite(r.intensity),
      snr: finite(r.snr),
      continuity: finite(r.continuity),
      spottiness: finite(r.spottiness),
      textureAmplitude: finite(r.textureAmplitude),
      hkl: r.hkl ? r.hkl.join(' ') : null,
      tentativeHkl: !r.hkl && a ? a.hkl.join(' ') : null,
      phase: r.phase ?? (!r.hkl && a && best?.phase ? best.phase : null),
    };
  });
}
