/**
 * An analysis seen through another camera: the measured radii stay, their d,
 * the candidates and the ring labels are recomputed. Used to apply a
 * calibration to a pattern measured earlier, and for an internal standard
 * (calibrate on the known phase's rings of the same image, then index the rest).
 */
import type { Phase } from '../crystal/phase';
import { electronWavelengthA } from '../physics';
import type { AnalysisResult } from './analysis-result';
import type { AnalysisCamera } from './analysis-settings';
import { indexRingRadii, NOMINAL_CAMERA_WARNING } from './index-ring-radii';

export interface ReindexOptions {
  /** Index only these rings (indices into result.rings); the others keep their d but no hkl. Default: all. */
  ringIndices?: readonly number[];
  calibrationRelativeSigma?: number;
}

/** A new result; `result` is not mutated. The camera must be at the analysis's voltage. */
export function reindexAnalysis(result: AnalysisResult, camera: AnalysisCamera, phases: readonly Phase[], options: ReindexOptions = {}): AnalysisResult {
  if (Math.abs(camera.voltageV / result.voltageV - 1) > 1e-9) {
    throw new RangeError(`the camera is for ${camera.voltageV} V but the pattern was taken at ${result.voltageV} V; a camera calibration holds only at its own voltage`);
  }
  const chosen = options.ringIndices ?? result.rings.map((_, i) => i);
  for (const i of chosen) if (!(Number.isInteger(i) && i >= 0 && i < result.rings.length)) throw new RangeError(`ringIndices: ${i} is not a ring of this analysis (0 to ${result.rings.length - 1})`);
  const all = indexRingRadii(result.rings, camera, [], 0).dSpacings; // d of every ring (no indexing)
  const sub = indexRingRadii(chosen.map((i) => result.rings[i]!), camera, phases, options.calibrationRelativeSigma);
  const byRing = new Map(chosen.map((ringIndex, k) => [ringIndex, k]));
  return {
    ...result,
    camera: { cameraLengthPx: camera.cameraLengthPx, cameraLengthSigmaPx: camera.cameraLengthSigmaPx, source: camera.source, calibrated: camera.calibrated },
    wavelengthA: electronWavelengthA(camera.voltageV),
    rings: result.rings.map((r, i) => {
      const k = byRing.get(i);
      const a = k === undefined ? null : sub.assignment[k];
      return { ...r, dA: all[i]!.dA, dSigmaA: all[i]!.dSigmaA, hkl: a?.hkl ?? null, phase: a?.phase ?? null };
    }),
    // Candidates' ringIndex refer to the indexed subset; map them back to the analysis's rings.
    candidates: sub.indexing.candidates.map((c) => ({ ...c, assignments: c.assignments.map((x) => ({ ...x, ringIndex: chosen[x.ringIndex]! })) })),
    ambiguities: sub.indexing.ambiguities,
    secondPhase: sub.indexing.secondPhase.map((s) => ({ ...s, ringIndex: chosen[s.ringIndex]! })),
    conclusion: sub.indexing.conclusion,
    warnings: [...result.warnings.filter((w) => w !== NOMINAL_CAMERA_WARNING), ...(camera.calibrated ? [] : [NOMINAL_CAMERA_WARNING])],
    notes: sub.indexing.notes,
  };
}
