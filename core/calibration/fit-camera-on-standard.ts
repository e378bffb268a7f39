/**
 * The camera fitted on a standard's rings in two passes, for a camera of unknown length.
 *
 * calibrateCamera (camera-calibration.ts) predicts the standard's rings down to 0.9 x the
 * smallest d measured under the analyses' own camera. When that camera is far from the
 * truth, the predicted list may stop short of the outer measured rings (or go far beyond
 * them). So the first pass sees the analyses through a camera that puts the outermost ring
 * at d = 0.3 Å, whose predicted list covers every measured ring whatever camera the
 * analyses were made with; the second sees them through the first pass's camera, so the
 * list ends just beyond the outermost ring, as calibrateCamera intends.
 */
import type { Phase } from '../crystal/phase';
import { electronWavelengthA } from '../physics';
import type { AnalysisResult } from '../pipeline/analysis-result';
import { reindexAnalysis } from '../pipeline/reindex-analysis';
import { calibrateCamera, type CalibrationOutcome } from './camera-calibration';

/** Smallest d (Å) the standard's predicted rings go down to on the first pass. */
export const FIRST_PASS_D_MIN_A = 0.3;

/** The same analyses seen through a camera of length `cameraLengthPx` (d recomputed; nothing indexed). */
function throughCamera(analyses: readonly AnalysisResult[], cameraLengthPx: number, source: string): AnalysisResult[] {
  return analyses.map((a) =>
    a.rings.length === 0 ? a : reindexAnalysis(a, { voltageV: a.voltageV, cameraLengthPx, cameraLengthSigmaPx: 0, source, calibrated: false }, [], { ringIndices: [] }),
  );
}

/**
 * Fits the camera length over pixel pitch on the standard's rings of `analyses`, in two
 * passes (see the module comment). Both passes use the nominal camera length when one is
 * given (its assignment window and the > 5 % warning of calibrateCamera).
 * @param analyses analyses of the standard at one voltage (any camera: only radii are used)
 * @param standard the standard's phase (its lattice constant is the reference)
 * @param nominalCameraLengthPx nominal L/p (px, > 0), or null when none is known
 * @returns calibrateCamera's outcome: the fit, or a reason with the residuals it had
 */
export function fitCameraOnStandard(analyses: readonly AnalysisResult[], standard: Phase, nominalCameraLengthPx: number | null): CalibrationOutcome {
  const options = nominalCameraLengthPx ? { nominalCameraLengthPx } : {};
  const outermost = Math.max(0, ...analyses.flatMap((a) => a.rings.map((r) => r.radiusPx)));
  if (!(outermost > 0)) return calibrateCamera(analyses, standard, options);
  const lambda = electronWavelengthA(analyses[0]!.voltageV);
  // Exact flat-detector geometry R = (L/p) tan(2 asin(lambda / 2d)) (physics/detector-geometry.ts),
  // solved for the L/p that puts the outermost ring at d = FIRST_PASS_D_MIN_A.
  const wide = outermost / Math.tan(2 * Math.asin(lambda / (2 * FIRST_PASS_D_MIN_A)));
  const first = calibrateCamera(throughCamera(analyses, wide, 'first pass'), standard, options);
  if (!first.ok) return first;
  return calibrateCamera(throughCamera(analyses, first.calibration.cameraLengthPx, 'second pass'), standard, options);
}
