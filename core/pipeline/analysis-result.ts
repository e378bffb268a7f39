/**
 * The result of analysing one pattern: plain data, JSON-stable (outside tools
 * read it; fields are added, never renamed). Units are in the names.
 */
import type { Hkl } from '../crystal/hkl';
import type { Ambiguity } from '../indexing/ambiguity';
import type { IndexCandidate } from '../indexing/index-rings';
import type { IndexingConclusion } from '../indexing/indexing-conclusion';
import type { SecondPhaseRing } from '../indexing/phase-matching';
import type { PatternMaskSummary } from './pattern-mask';

export interface AnalyzedRing {
  /** Corrected radius (geometric mean of the semi-axes), px, and its standard uncertainty from the peak fit. */
  radiusPx: number;
  radiusSigmaPx: number;
  /** Photon-counting (Cramer-Rao) limit of radiusSigmaPx, px; null when the counts scale is unknown. */
  radiusBoundPx: number | null;
  /** d-spacing by the exact flat-detector geometry, Å, with radius and camera uncertainty propagated. */
  dA: number;
  dSigmaA: number;
  fwhmPx: number;
  /** Integrated intensity above background in the radial profile (counts per pixel x px). */
  intensity: number;
  snr: number;
  continuity: number;
  spottiness: number;
  textureAmplitude: number;
  /** Indices and phase from the best candidate, or null when it does not explain this ring. */
  hkl: Hkl | null;
  phase: string | null;
}

export interface AnalysisResult {
  image: { width: number; height: number; bitsPerSample: number };
  voltageV: number;
  wavelengthA: number;
  camera: { cameraLengthPx: number; cameraLengthSigmaPx: number; source: string; calibrated: boolean };
  /** Pattern centre; sigmaPx is the root-mean-square of the x and y standard uncertainties. */
  center: { xPx: number; yPx: number; sigmaPx: number; sigmaXPx: number; sigmaYPx: number };
  /**
   * Common elliptical distortion of the concentric fit: axis ratio major/minor >= 1, major-axis angle in
   * degrees from +x toward +y in [0, 180) (angleSigmaDeg null when the angle is undetermined, q near 1),
   * and each ring's own direct least-squares ellipse for comparison.
   */
  distortion: {
    axisRatio: number;
    axisRatioSigma: number;
    angleDeg: number;
    angleSigmaDeg: number | null;
    perRing: Array<{ radiusPx: number; axisRatio: number; axisRatioSigma: number | null; angleDeg: number; angleSigmaDeg: number | null; centerXPx: number; centerYPx: number }>;
  };
  masks: PatternMaskSummary;
  rings: AnalyzedRing[];
  /** The radial profile (corrected frame) and its background, for plots and reports. */
  profile: { rMinPx: number; binWidthPx: number; radiusPx: number[]; mean: number[]; background: number[] };
  candidates: IndexCandidate[];
  ambiguities: Ambiguity[];
  secondPhase: SecondPhaseRing[];
  conclusion: IndexingConclusion;
  /** 'ok'; 'no-rings' when the image shows no ring (the profile is still given); 'no-geometry' when no centre was found. */
  status: 'ok' | 'no-rings' | 'no-geometry';
  /** Things that could mislead if unread: nominal camera, saturated pixels, fits that needed care. */
  warnings: string[];
  /** What the indexer noticed about close alternatives (fcc versus diamond, phases a separates). */
  notes: string[];
  /** Wall time of each stage, ms (for benchmarks; not part of the science). */
  timingsMs: Record<string, number>;
}
