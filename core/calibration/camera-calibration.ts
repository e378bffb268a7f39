/**
 * Calibrating the camera on a standard film: the rings of one or more images
 * of a known phase (e.g. gold) fix the camera length over pixel pitch Lp in
 * the exact geometry (camera-length-fit.ts), the images' own geometry fits give
 * the elliptical distortion, and every ring's residual is reported in ppm of d.
 *
 * The same function serves an internal standard: a known phase present in the
 * same film as the unknown; the rings it does not claim are left for indexing
 * with the new camera (pipeline/reindex-analysis.ts).
 */
import { predictRings } from '../crystal/predicted-rings';
import type { Phase } from '../crystal/phase';
import { electronWavelengthA } from '../physics';
import type { AnalysisResult } from '../pipeline/analysis-result';
import { fitCameraLength, MIN_CALIBRATION_RINGS, type RingResidual, type StandardRing } from './camera-length-fit';
import { assignStandardRings, ringLabel, type AssignmentOptions } from './standard-ring-assignment';

export interface CameraCalibration {
  standardPhaseId: string;
  voltageV: number;
  wavelengthA: number;
  cameraLengthPx: number;
  cameraLengthSigmaPx: number;
  reducedChiSquare: number;
  /** Weighted mean over the images of the concentric-fit distortion. */
  distortion: { axisRatio: number; axisRatioSigma: number; angleDeg: number; angleSigmaDeg: number | null };
  residuals: RingResidual[];
  /** Per image: which of its rings belong to the standard (indices into analysis.rings). */
  standardRings: number[][];
  imageCount: number;
  nominalCameraLengthPx: number | null;
  /** (fitted / nominal - 1), or null without a nominal value. */
  deviationFromNominal: number | null;
  warnings: string[];
}

export type CalibrationOutcome = { ok: true; calibration: CameraCalibration } | { ok: false; reason: string; residuals: RingResidual[] };

export interface CalibrationOptions extends AssignmentOptions {
  /** Warn when the fit and the nominal camera length differ by more than this fraction; default 0.05. */
  nominalWarnFraction?: number;
  /** Warn when fewer rings were usable; default 5 (Annula's rule: a line through the origin from fewer rings has little check on itself). */
  fewRingsWarning?: number;
}

/** Weighted mean of values with standard uncertainties; the uncertainty of the mean, widened by the Birge ratio. */
function weightedMean(values: number[], sigmas: number[]): { mean: number; sigma: number; reducedChiSquare: number } {
  let sw = 0;
  let swx = 0;
  values.forEach((v, i) => {
    const w = 1 / (sigmas[i]! * sigmas[i]!);
    sw += w;
    swx += w * v;
  });
  const mean = swx / sw;
  let chi2 = 0;
  values.forEach((v, i) => (chi2 += ((v - mean) / sigmas[i]!) ** 2));
  const reduced = values.length > 1 ? chi2 / (values.length - 1) : 0;
  return { mean, sigma: Math.sqrt(1 / sw) * Math.max(1, Math.sqrt(reduced)), reducedChiSquare: reduced };
}

/**
 * @param analyses analyses of images of the standard, all at the same voltage and camera setting
 * @param standard the standard's phase (its reference lattice constant is the calibration's reference)
 */
export function calibrateCamera(analyses: readonly AnalysisResult[], standard: Phase, options: CalibrationOptions = {}): CalibrationOutcome {
  if (analyses.length === 0) throw new RangeError('calibrateCamera needs at least one analysis of the standard');
  const voltageV = analyses[0]!.voltageV;
  analyses.forEach((a, i) => {
    if (Math.abs(a.voltageV / voltageV - 1) > 1e-9) throw new RangeError(`analyses[${i}] is at ${a.voltageV} V, analyses[0] at ${voltageV} V; calibrate each voltage on its own`);
  });
  const wavelengthA = electronWavelengthA(voltageV);
  const warnings: string[] = [];
  const rings: StandardRing[] = [];
  const standardRings: number[][] = [];
  analyses.forEach((a, imageIndex) => {
    const usable = a.rings.filter((r) => r.radiusSigmaPx > 0);
    if (usable.length === 0) {
      warnings.push(`image ${imageIndex + 1}: no rings measured (${a.status})`);
      standardRings.push([]);
      return;
    }
    const dMinA = Math.max(0.3, 0.9 * Math.min(...a.rings.map((r) => r.dA)));
    const predicted = predictRings(standard, { dMinA });
    const assignment = assignStandardRings(a.rings, predicted, wavelengthA, options);
    if (!assignment) {
      warnings.push(`image ${imageIndex + 1}: its rings do not match ${standard.id} under any camera length${options.nominalCameraLengthPx ? ' near the nominal one' : ''}`);
      standardRings.push([]);
      return;
    }
    const mine: number[] = [];
    assignment.ringToStandard.forEach((k, i) => {
      if (k < 0) return;
      const p = predicted[k]!;
      rings.push({ hkl: p.families[0]!.hkl, radiusPx: a.rings[i]!.radiusPx, radiusSigmaPx: a.rings[i]!.radiusSigmaPx, dRefA: p.dA, label: ringLabel(p), imageIndex });
      mine.push(i);
    });
    const left = a.rings.length - mine.length;
    if (left > 0) warnings.push(`image ${imageIndex + 1}: ${left} ring${left === 1 ? '' : 's'} not of ${standard.id} (another phase, or artefacts) left out of the calibration`);
    standardRings.push(mine);
  });

  const fit = fitCameraLength(rings, wavelengthA);
  if (!fit.ok) return { ok: false, reason: fit.reason, residuals: fit.residuals };
  const rejected = fit.residuals.filter((r) => r.rejected);
  for (const r of rejected) warnings.push(`ring ${r.label} of image ${r.imageIndex + 1} rejected as an outlier (${r.residualPpm.toFixed(0)} ppm, ${r.standardisedResidual.toFixed(1)} sigma)`);
  const fewRings = options.fewRingsWarning ?? 5;
  if (fit.usedCount < fewRings) warnings.push(`only ${fit.usedCount} rings were usable (at least ${MIN_CALIBRATION_RINGS} are required, ${fewRings} advised): the calibration has little check on itself`);

  const nominal = options.nominalCameraLengthPx ?? null;
  const deviation = nominal ? fit.cameraLengthPx / nominal - 1 : null;
  const warnAt = options.nominalWarnFraction ?? 0.05;
  if (deviation !== null && Math.abs(deviation) > warnAt) {
    warnings.push(`the fitted camera length differs from the nominal one by ${(deviation * 100).toFixed(1)} %: check the magnification setting, the pixel size (binning) and the standard`);
  }

  const geo = analyses.filter((a) => a.status === 'ok' && a.distortion.axisRatioSigma > 0 && Number.isFinite(a.distortion.axisRatioSigma));
  let distortion: CameraCalibration['distortion'] = { axisRatio: 1, axisRatioSigma: Number.NaN, angleDeg: 0, angleSigmaDeg: null };
  if (geo.length > 0) {
    const q = weightedMean(geo.map((a) => a.distortion.axisRatio), geo.map((a) => a.distortion.axisRatioSigma));
    const withAngle = geo.filter((a) => a.distortion.angleSigmaDeg !== null);
    const ang = withAngle.length > 0 ? weightedMean(withAngle.map((a) => a.distortion.angleDeg), withAngle.map((a) => a.distortion.angleSigmaDeg!)) : null;
    if (q.reducedChiSquare > 9) warnings.push(`the images disagree on the distortion (axis ratios ${geo.map((a) => a.distortion.axisRatio.toFixed(4)).join(', ')}): was the microscope changed between them?`);
    distortion = { axisRatio: q.mean, axisRatioSigma: q.sigma, angleDeg: ang ? ang.mean : 0, angleSigmaDeg: ang ? ang.sigma : null };
  }

  return {
    ok: true,
    calibration: {
      standardPhaseId: standard.id,
      voltageV,
      wavelengthA,
      cameraLengthPx: fit.cameraLengthPx,
      cameraLengthSigmaPx: fit.cameraLengthSigmaPx,
      reducedChiSquare: fit.reducedChiSquare,
      distortion,
      residuals: fit.residuals,
      standardRings,
      imageCount: analyses.length,
      nominalCameraLengthPx: nominal,
      deviationFromNominal: deviation,
      warnings,
    },
  };
}
