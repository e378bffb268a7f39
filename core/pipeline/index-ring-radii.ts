/**
 * Ring radii to d-spacings and candidates: the stages after the profile, shared
 * by a fresh analysis and by re-indexing one with another camera (a calibration
 * applied later, or an internal standard).
 */
import type { Hkl } from '../crystal/hkl';
import type { Phase } from '../crystal/phase';
import { indexRings, type MeasuredRing, type RingIndexing } from '../indexing';
import { judgeIndexing } from '../indexing/indexing-conclusion';
import type { AnalysisCamera } from './analysis-settings';
import { ringDSpacings, type RingDSpacing } from './ring-d-spacings';

export interface RingRadius {
  radiusPx: number;
  radiusSigmaPx: number;
  intensity: number;
}

export interface RingRadiusIndexing {
  /** d and its uncertainty (radius and camera) per ring, in the rings' order. */
  dSpacings: RingDSpacing[];
  indexing: RingIndexing;
  /** The best candidate's indices and phase for ring i, when the answer is conclusive and explains it. */
  assignment: Array<{ hkl: Hkl; phase: string | null } | null>;
}

export const NOMINAL_CAMERA_WARNING =
  'the camera length is nominal, not calibrated: every d and lattice constant carries its error (nominal camera lengths are often off by a few percent, common practice); calibrate on a standard film for accurate values';

/**
 * @param calibrationRelativeSigma relative uncertainty of the camera scale; default cameraLengthSigmaPx / cameraLengthPx
 */
export function indexRingRadii(rings: readonly RingRadius[], camera: AnalysisCamera, phases: readonly Phase[], calibrationRelativeSigma?: number): RingRadiusIndexing {
  const dSpacings = ringDSpacings(rings, camera);
  // The indexer gets d with the radius uncertainty alone: the camera's error is common to every
  // ring (fully correlated), so it enters once, through calibrationRelativeSigma, not per ring.
  const radiusOnly = camera.cameraLengthSigmaPx > 0 ? ringDSpacings(rings, { ...camera, cameraLengthSigmaPx: 0 }) : dSpacings;
  const measured: MeasuredRing[] = rings.map((r, i) => ({
    dA: dSpacings[i]!.dA,
    dSigmaA: Math.max(radiusOnly[i]!.dSigmaA, 1e-6 * dSpacings[i]!.dA),
    intensity: Math.max(0, r.intensity),
  }));
  const relSigma = calibrationRelativeSigma ?? camera.cameraLengthSigmaPx / camera.cameraLengthPx;
  const indexing: RingIndexing =
    measured.length >= 2
      ? indexRings(measured, { phases, ...(relSigma > 0 ? { calibrationRelativeSigma: relSigma } : {}) })
      : {
          candidates: [],
          ambiguities: [],
          secondPhase: [],
          conclusion: judgeIndexing(measured, null),
          notes: measured.length === 1 ? ['only one ring was measured: no lattice can be indexed from it'] : [],
        };
  const assignment: RingRadiusIndexing['assignment'] = rings.map(() => null);
  const best = indexing.candidates[0];
  if (best && indexing.conclusion.conclusive) for (const a of best.assignments) assignment[a.ringIndex] = { hkl: a.hkl, phase: best.phase };
  return { dSpacings, indexing, assignment };
}
