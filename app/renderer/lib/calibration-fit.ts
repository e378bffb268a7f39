/**
 * The camera calibration of the workspace, pure and run in the analysis worker: the same
 * two-pass fit on a standard's rings and the same refusals as `annula calibrate`
 * (app/cli/calibration-camera.ts and app/cli/commands/calibrate.ts, whose module cannot be
 * bundled for the browser because it reaches the Node store), and the record the store
 * keeps. The camera uncertainty budget is core/calibration's, as in the CLI.
 */
import {
  calibrateCamera,
  cameraUncertaintyBudget,
  cameraWithBudget,
  DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE,
  standardReferenceUncertainty,
  type CalibrationOutcome,
  type CameraCalibration,
  type CameraUncertaintyBudget,
} from '../../../core/calibration';
import { predictRings, type Phase } from '../../../core/crystal';
import { dSpacingFromRadiusA, electronWavelengthA, ringRadiusPx } from '../../../core/physics';
import { reindexAnalysis, type AnalysisCamera, type AnalysisResult } from '../../../core/pipeline';
import type { CalibrationSummary } from '../../handlers/contract';

/** The outlier rule of core/calibration/camera-length-fit.ts, for people (as the CLI states it). */
export const OUTLIER_RULE = 'a ring is left out when its standardised residual departs from the median by more than max(4, 4 × 1.4826 × MAD); the worst goes first and the fit is repeated, while at least 3 rings remain';

const FIRST_PASS_D_MIN_A = 0.3;

function throughCamera(analyses: readonly AnalysisResult[], cameraLengthPx: number, source: string): AnalysisResult[] {
  return analyses.map((a) => (a.rings.length === 0 ? a : reindexAnalysis(a, { voltageV: a.voltageV, cameraLengthPx, cameraLengthSigmaPx: 0, source, calibrated: false }, [], { ringIndices: [] })));
}

/** The two-pass fit of `annula calibrate` (first pass with the outermost ring at d = 0.3 Å, then through the first pass's camera). */
export function fitCameraOnStandard(analyses: readonly AnalysisResult[], standard: Phase, nominalCameraLengthPx: number | null): CalibrationOutcome {
  const options = nominalCameraLengthPx ? { nominalCameraLengthPx } : {};
  const outermost = Math.max(0, ...analyses.flatMap((a) => a.rings.map((r) => r.radiusPx)));
  if (!(outermost > 0)) return calibrateCamera(analyses, standard, options);
  const lambda = electronWavelengthA(analyses[0]!.voltageV);
  const wide = outermost / Math.tan(2 * Math.asin(lambda / (2 * FIRST_PASS_D_MIN_A)));
  const first = calibrateCamera(throughCamera(analyses, wide, 'first pass'), standard, options);
  if (!first.ok) return first;
  return calibrateCamera(throughCamera(analyses, first.calibration.cameraLengthPx, 'second pass'), standard, options);
}

/** Why a fit is not trusted (the CLI's refusals): the strongest measured ring is not the standard's, or the standard's strongest ring is missing. Empty when trusted. */
export function untrustedFit(fit: CameraCalibration, analyses: readonly AnalysisResult[], standard: Phase): string[] {
  const camera = { wavelengthA: fit.wavelengthA, cameraLengthPx: fit.cameraLengthPx };
  const problems: string[] = [];
  analyses.forEach((a, image) => {
    if (a.rings.length === 0) return;
    let strongest = 0;
    a.rings.forEach((r, i) => {
      if (r.snr > a.rings[strongest]!.snr) strongest = i;
    });
    if (!fit.standardRings[image]?.includes(strongest)) {
      const ring = a.rings[strongest]!;
      problems.push(`the strongest ring (R = ${ring.radiusPx.toFixed(2)} px, d = ${dSpacingFromRadiusA(ring.radiusPx, camera).toFixed(4)} Å under the fit) is not a ring of ${standard.id}: the film is probably not ${standard.id}, or the fit matched the wrong rings`);
    }
    const outermost = Math.max(...a.rings.map((r) => r.radiusPx));
    const rings = predictRings(standard, { dMinA: Math.max(0.3, (0.9 * fit.wavelengthA) / (2 * Math.sin(Math.atan2(outermost, fit.cameraLengthPx) / 2))) });
    if (rings.length === 0) return;
    const top = rings.reduce((best, r) => (r.relativeIntensity > best.relativeIntensity ? r : best));
    const radiusPx = ringRadiusPx(top.dA, camera);
    if (radiusPx < a.profile.rMinPx || radiusPx > outermost * 1.002) return;
    const matched = fit.residuals.some((r) => r.imageIndex === image && !r.rejected && Math.abs(r.dRefA / top.dA - 1) < 1e-9);
    if (!matched) problems.push(`${standard.id}'s strongest ring (d = ${top.dA.toFixed(4)} Å) would lie at R = ${radiusPx.toFixed(1)} px, inside the measured range, but no ring was measured there`);
  });
  return problems;
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
