/**
 * The camera calibration of the workspace: the workspace's words for core's refusals of an
 * untrusted fit (the two-pass fit itself is core/calibration/fit-camera-on-standard.ts, run
 * in the analysis worker, as in `annula calibrate`), the camera and budget of a saved
 * calibration, and the record the store keeps. The camera uncertainty budget is
 * core/calibration's, as in the CLI.
 */
import {
  cameraUncertaintyBudget,
  cameraWithBudget,
  DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE,
  missingStrongestStandardRings,
  standardReferenceUncertainty,
  strongestRingsNotOfStandard,
  type CameraCalibration,
  type CameraUncertaintyBudget,
} from '../../../core/calibration';
import type { Phase } from '../../../core/crystal';
import { dSpacingFromRadiusA } from '../../../core/physics';
import type { AnalysisCamera, AnalysisResult } from '../../../core/pipeline';
import type { CalibrationSummary } from '../../handlers/contract';

/** The outlier rule of core/calibration/camera-length-fit.ts, for people (as the CLI states it). */
export const OUTLIER_RULE = 'a ring is left out when its standardised residual departs from the median by more than max(4, 4 × 1.4826 × MAD); the worst goes first and the fit is repeated, while at least 3 rings remain';

/**
 * Why a fit is not trusted, in the workspace's words: the strongest measured ring is not the
 * standard's (core/calibration/strongest-measured-ring-check.ts), or the standard's strongest
 * ring is missing (strongest-standard-ring-check.ts); image by image, in that order. Empty when trusted.
 */
export function untrustedFit(fit: CameraCalibration, analyses: readonly AnalysisResult[], standard: Phase): string[] {
  const notOfStandard = strongestRingsNotOfStandard(fit, analyses);
  const missing = missingStrongestStandardRings(fit, analyses, standard);
  return analyses.flatMap((_, image) => [
    ...notOfStandard
      .filter((f) => f.imageIndex === image)
      .map((f) => `the strongest ring (R = ${f.radiusPx.toFixed(2)} px, d = ${f.dA.toFixed(4)} Å under the fit) is not a ring of ${standard.id}: the film is probably not ${standard.id}, or the fit matched the wrong rings`),
    ...missing
      .filter((f) => f.imageIndex === image)
      .map((f) => `${standard.id}'s strongest ring (d = ${f.ring.dA.toFixed(4)} Å) would lie at R = ${f.radiusPx.toFixed(1)} px, inside the measured range, but no ring was measured there`),
  ]);
}

/** The budget a calibration carries when applied to a later image: fit, the standard's reference a, the default reproducibility (as `annula check` without --camera-reproducibility). */
export function budgetForCalibration(c: Pick<CalibrationSummary, 'cameraLengthPx' | 'cameraLengthSigmaPx' | 'standardPhaseId'>, phases: readonly Phase[]): CameraUncertaintyBudget {
  const id = c.standardPhaseId;
  const phase = phases.find((p) => p.id === id) ?? phases.find((p) => p.id.toLowerCase() === id.toLowerCase());
  const reference = standardReferenceUncertainty({ id, aA: phase?.cell.aA ?? 4 });
  return cameraUncertaintyBudget(c.cameraLengthSigmaPx / c.cameraLengthPx, reference, { relative: DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE, source: 'default' });
}

/** The camera of a saved calibration at `voltageV`, its uncertainty the whole budget; an error message when the voltage differs. */
export function calibrationCamera(c: CalibrationSummary, voltageV: number, phases: readonly Phase[]): { ok: true; camera: AnalysisCamera; budget: CameraUncertaintyBudget } | { ok: false; message: string } {
  if (Math.abs(c.voltageV / voltageV - 1) > 1e-6) {
    return { ok: false, message: `calibration "${c.name}" was made at ${(c.voltageV / 1e3).toFixed(0)} kV, this pattern at ${(voltageV / 1e3).toFixed(0)} kV; a calibration holds only at its own voltage: choose one made at this voltage, or correct the voltage` };
  }
  const budget = budgetForCalibration(c, phases);
  const camera = cameraWithBudget(
    { voltageV: c.voltageV, cameraLengthPx: c.cameraLengthPx, cameraLengthSigmaPx: c.cameraLengthSigmaPx, source: `calibration "${c.name}" (${c.standardPhaseId}, ${c.created.slice(0, 10)}${c.instrument ? `, ${c.instrument}` : ''})`, calibrated: true },
    budget,
  );
  return { ok: true, camera, budget };
}

/** Angle in [0, 180), as the store keeps it. */
function axisAngle(deg: number): number {
  const a = ((deg % 180) + 180) % 180;
  return a >= 180 ? 0 : a;
}

/** The store's NewCalibration of a fit on one image (validated again by the store). */
export function calibrationRecord(
  fit: CameraCalibration,
  analysis: AnalysisResult,
  setting: { name: string; instrument: string | null; nominalCameraLengthM: number | null; pixelSizeM: number | null; image: { sha256: string; path: string } },
): Record<string, unknown> {
  const camera = { wavelengthA: fit.wavelengthA, cameraLengthPx: fit.cameraLengthPx };
  const used = fit.residuals.filter((r) => !r.rejected);
  const rejected = fit.residuals.filter((r) => r.rejected);
  const notOfStandard = analysis.rings.flatMap((ring, i) =>
    fit.standardRings[0]?.includes(i)
      ? []
      : [{ hkl: null, dA: dSpacingFromRadiusA(ring.radiusPx, camera), radiusPx: ring.radiusPx, residualPpm: null, image: 0, reason: `no ${fit.standardPhaseId} reflection at this radius under the fitted camera: another phase, or an artefact; left out of the fit` }],
  );
  const q = fit.distortion;
  return {
    name: setting.name,
    instrument: setting.instrument,
    voltageV: fit.voltageV,
    nominalCameraLengthM: setting.nominalCameraLengthM,
    pixelSizeM: setting.pixelSizeM,
    standardPhaseId: fit.standardPhaseId,
    cameraLengthPx: fit.cameraLengthPx,
    cameraLengthSigmaPx: fit.cameraLengthSigmaPx,
    axisRatio: Math.max(1, q.axisRatio),
    axisRatioSigma: Number.isFinite(q.axisRatioSigma) ? q.axisRatioSigma : 0,
    angleDeg: axisAngle(q.angleDeg),
    angleSigmaDeg: q.angleSigmaDeg !== null && Number.isFinite(q.angleSigmaDeg) ? q.angleSigmaDeg : null,
    residuals: used.map((r) => ({ hkl: [...r.hkl], dA: r.dFitA, residualPpm: r.residualPpm, radiusPx: r.radiusPx, image: r.imageIndex })),
    imageFingerprints: [{ sha256: setting.image.sha256, path: setting.image.path }],
    rejectedRings: [
      ...rejected.map((r) => ({ hkl: [...r.hkl], dA: r.dFitA, radiusPx: r.radiusPx, residualPpm: r.residualPpm, image: r.imageIndex, reason: `outlier: z = ${r.standardisedResidual.toFixed(1)} (${r.residualPpm.toFixed(0)} ppm of d); rule: ${OUTLIER_RULE}` })),
      ...notOfStandard,
    ],
    notes: ['calibrated in the Annula workspace', ...fit.warnings].join('\n'),
  };
}
