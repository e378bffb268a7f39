/**
 * Cameras from calibrations, for the commands: fitting one on a standard's rings
 * (`calibrate`, and an internal standard in `analyze`), and turning a stored
 * calibration into the camera of a later analysis (`analyze --calibration`, `check`).
 */
import {
  cameraUncertaintyBudget,
  cameraWithBudget,
  DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE,
  missingStrongestStandardRings,
  standardReferenceUncertainty,
  type CameraCalibration,
  type CameraUncertaintyBudget,
  type ReproducibilitySource,
} from '../../core/calibration';
import type { Phase } from '../../core/crystal';
import type { AnalysisCamera, AnalysisResult } from '../../core/pipeline';
import type { CalibrationRecord, LabStore } from '../node/store';
import { LabStoreError } from '../node/store';
import { parseRelative } from '../common/quantity';
import { InputError, UsageError } from './exit-codes';
import { kilovolts } from './number-format';

/** The two-pass fit on a standard's rings, core's (core/calibration/fit-camera-on-standard.ts), for `analyze --internal-standard`. */
export { fitCameraOnStandard } from '../../core/calibration';

/**
 * The standard's strongest ring must be among the matched rings of every image whose
 * measured range holds it (core/calibration/strongest-standard-ring-check.ts), in the
 * commands' words.
 * @returns one sentence per image that lacks it
 */
export function missingStrongestStandardRing(fit: CameraCalibration, analyses: readonly AnalysisResult[], standard: Phase): string[] {
  return missingStrongestStandardRings(fit, analyses, standard).map(
    ({ imageIndex, ring, radiusPx }) =>
      `image ${imageIndex + 1}: ${standard.id}'s strongest ring (${ring.families.map((f) => f.hkl.join(' ')).join(' + ')}, d = ${ring.dA.toFixed(4)} Å) would lie at R = ${radiusPx.toFixed(1)} px under the fitted camera (L/p = ${fit.cameraLengthPx.toFixed(1)} px), inside the measured range, but no ring was measured there`,
  );
}

/**
 * The camera of a fit, for the analysis it calibrates, with the budget's total as its
 * uncertainty (the fit's own sigma is one term of it).
 */
export function cameraFromFit(fit: CameraCalibration, source: string, budget: CameraUncertaintyBudget): AnalysisCamera {
  return cameraWithBudget({ voltageV: fit.voltageV, cameraLengthPx: fit.cameraLengthPx, cameraLengthSigmaPx: fit.cameraLengthSigmaPx, source, calibrated: true }, budget);
}

/** The largest --camera-reproducibility accepted (10 %: beyond it the camera is no calibration at all). */
const MAX_CAMERA_REPRODUCIBILITY = 0.1;

/**
 * Reads --camera-reproducibility: absent gives the documented default (0.1 %, core/calibration
 * camera-uncertainty-budget.ts); zero only when written (0, 0% or 0ppm).
 * @throws UsageError (QuantityError) for a value that is not a relative value between 0 and 10 %
 */
export function readCameraReproducibility(text: string | undefined): { relative: number; source: ReproducibilitySource } {
  if (text === undefined) return { relative: DEFAULT_CAMERA_REPRODUCIBILITY_RELATIVE, source: 'default' };
  if (/^\s*[+]?0*\.?0*\s*(%|ppm)?\s*$/.test(text) && /0/.test(text)) return { relative: 0, source: 'given' };
  const relative = parseRelative(text, '--camera-reproducibility');
  if (relative > MAX_CAMERA_REPRODUCIBILITY) {
    throw new UsageError(`--camera-reproducibility: ${text} is more than 10 %; give the relative standard uncertainty of the camera length between images at the same settings, e.g. 0.1% with height control or 0.3% without`);
  }
  return { relative, source: 'given' };
}

/** Words for the transfer term, for people and reports. */
export function reproducibilityWords(budget: CameraUncertaintyBudget): string {
  if (budget.reproducibilitySource === 'same image') return 'none: the internal standard is on the same image';
  if (budget.reproducibilitySource === 'given') return 'as given (--camera-reproducibility)';
  return 'default; it assumes the eucentric height and standard focus, as for the standard, and is a few tenths of a percent without height control (from memory): set --camera-reproducibility';
}

/** One line of the budget for people: "fit 0.0004 %, reference (Au) 0.039 %, ... total 0.107 %". */
export function budgetLine(budget: CameraUncertaintyBudget): string {
  const p = (x: number): string => `${(x * 100).toFixed(4)} %`;
  return (
    `camera length, relative standard uncertainties: fit ${p(budget.fitRelative)}, reference a of ${budget.reference.phase} ${p(budget.referenceRelative)} ` +
    `(value ${p(budget.reference.valueRelative)}${budget.reference.valueSource === 'library default' ? ' library default' : ' stated'}, temperature ${p(budget.reference.thermalRelative)}, thin film ${p(budget.reference.filmRelative)}), ` +
    `reproducibility ${p(budget.reproducibilityRelative)} (${reproducibilityWords(budget)}); total ${p(budget.totalRelative)} (root sum of squares, JCGM 100)`
  );
}

/**
 * The budget of a stored calibration applied to a later image: its fit, its standard's
 * reference (found in `library`; a standard not there is taken as cubic, its a from the
 * recorded residuals, with a warning) and the transfer term.
 */
export function budgetForRecord(record: CalibrationRecord, library: readonly Phase[], reproducibility: { relative: number; source: ReproducibilitySource }): { budget: CameraUncertaintyBudget; warnings: string[] } {
  const warnings: string[] = [];
  const id = record.standardPhaseId;
  const phase = library.find((p) => p.id === id) ?? library.find((p) => p.id.toLowerCase() === id.toLowerCase());
  let aA = phase?.cell.aA;
  if (aA === undefined) {
    const r = record.residuals[0];
    aA = r ? r.dA * Math.hypot(r.hkl[0], r.hkl[1], r.hkl[2]) : 4;
    warnings.push(`calibration "${record.name}": its standard ${id} is not among the phases loaded; its reference uncertainty was taken as the library default for a cubic a = ${aA.toFixed(4)} Å (give the standard's file with --phases to use its own value)`);
  }
  const reference = standardReferenceUncertainty({ id, aA });
  return { budget: cameraUncertaintyBudget(record.cameraLengthSigmaPx / record.cameraLengthPx, reference, reproducibility), warnings };
}

/**
 * Looks up a calibration by name.
 * @throws UsageError when the store has none of that name (listing what it has); InputError for a store problem
 */
export async function findStoredCalibration(store: LabStore, name: string): Promise<CalibrationRecord> {
  let record: CalibrationRecord | null;
  let names: string[] = [];
  try {
    record = await store.findCalibration(name);
    if (!record) names = (await store.listCalibrations()).map((c) => c.name);
  } catch (error) {
    if (error instanceof LabStoreError) throw new InputError(error.message);
    throw error;
  }
  if (record) return record;
  const known = names.length ? `; it holds ${names.slice(-8).map((n) => `"${n}"`).join(', ')}${names.length > 8 ? ` and ${names.length - 8} more` : ''}` : '; it holds no calibrations yet';
  throw new UsageError(`--calibration: no calibration "${name}" in the lab store ${store.path}${known}; list them with annula calibrations, or make one with annula calibrate --save`);
}

/**
 * The camera of a stored calibration for an image taken at `voltageV` (null: the
 * calibration's own voltage), its uncertainty the budget's total. A calibration holds
 * only at its own voltage.
 * @throws UsageError when the voltages differ
 */
export function cameraFromRecord(record: CalibrationRecord, voltageV: number | null, voltageFrom: string, budget: CameraUncertaintyBudget): AnalysisCamera {
  if (voltageV !== null && Math.abs(voltageV / record.voltageV - 1) > 1e-6) {
    throw new UsageError(
      `calibration "${record.name}" was made at ${kilovolts(record.voltageV)} kV, but ${voltageFrom} says ${kilovolts(voltageV)} kV; a camera calibration holds only at its own voltage: use a calibration made at ${kilovolts(voltageV)} kV, or correct the voltage`,
    );
  }
  // The record keeps the fit's sigma; the camera carries the whole budget (fit, reference, transfer).
  return cameraWithBudget(
    {
      voltageV: record.voltageV,
      cameraLengthPx: record.cameraLengthPx,
      cameraLengthSigmaPx: record.cameraLengthSigmaPx,
      source: `calibration "${record.name}" (${record.standardPhaseId}, ${record.created.slice(0, 10)}${record.instrument ? `, ${record.instrument}` : ''})`,
      calibrated: true,
    },
    budget,
  );
}

/** Smallest of the angle differences a - b and its turns by 180 degrees (an ellipse's axis has no sign), degrees. */
function axisAngleDifferenceDeg(a: number, b: number): number {
  const d = (((a - b) % 180) + 180) % 180;
  return d > 90 ? d - 180 : d;
}

/** Standardised differences larger than this are reported (3 sigma: common practice for a consistency check). */
const DISTORTION_Z_LIMIT = 3;

/**
 * A warning when the image's own distortion fit differs from the calibration's beyond the
 * combined uncertainty: z = |x1 - x2| / sqrt(s1^2 + s2^2) > 3 for the axis ratio, and for
 * the major-axis angle when both fits determine it. Null when they agree or cannot be compared.
 */
export function distortionDisagreement(result: AnalysisResult, record: CalibrationRecord): string | null {
  const d = result.distortion;
  if (result.status !== 'ok' || !(d.axisRatioSigma > 0)) return null;
  const problems: string[] = [];
  const qSigma = Math.hypot(d.axisRatioSigma, record.axisRatioSigma);
  const qZ = Math.abs(d.axisRatio - record.axisRatio) / qSigma;
  if (qSigma > 0 && qZ > DISTORTION_Z_LIMIT) problems.push(`axis ratio ${d.axisRatio.toFixed(5)} against ${record.axisRatio.toFixed(5)} (${qZ.toFixed(1)} sigma)`);
  if (d.angleSigmaDeg !== null && record.angleSigmaDeg !== null) {
    const aSigma = Math.hypot(d.angleSigmaDeg, record.angleSigmaDeg);
    const aZ = Math.abs(axisAngleDifferenceDeg(d.angleDeg, record.angleDeg)) / aSigma;
    if (aSigma > 0 && aZ > DISTORTION_Z_LIMIT) problems.push(`major axis at ${d.angleDeg.toFixed(2)} deg against ${record.angleDeg.toFixed(2)} deg (${aZ.toFixed(1)} sigma)`);
  }
  if (problems.length === 0) return null;
  return `the image's elliptical distortion differs from that of calibration "${record.name}" beyond their uncertainties: ${problems.join('; ')}; the image's own fit was used, but check that the microscope was at the calibration's settings (projector lenses, camera length)`;
}
