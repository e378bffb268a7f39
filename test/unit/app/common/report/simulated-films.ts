/**
 * Real analyses of simulated films for the report tests, in an invented
 * scenario: the Corrie Vale Coatings Laboratory (fictional; samples/README.md)
 * calibrates its 200 kV camera on an evaporated gold film and checks sputtered
 * TiN coatings. Every image comes from Annula's simulator and goes through the
 * whole pipeline: masks, geometry, profile, peak fits, indexing, calibration
 * and the film check.
 */
import { createHash } from 'node:crypto';
import { loadOpenCv } from '../../../../../app/node/load-opencv';
import type { ReportCalibration } from '../../../../../app/common/report';
import type { CalibrationRecord } from '../../../../../app/node/store';
import { calibrateCamera, type CameraCalibration } from '../../../../../core/calibration';
import { findPhase, phaseLibrary } from '../../../../../core/crystal';
import type { Raster } from '../../../../../core/image/raster';
import { analyze, buildPatternMask, type AnalysisResult } from '../../../../../core/pipeline';
import { checkFilm, type FilmCheck } from '../../../../../core/qa';
import type { PixelMask } from '../../../../../core/rings/pixel-mask';
import { amorphousCarbonHalos, simulatePattern, type SimulationSpec } from '../../../../../core/simulate';

/** The true camera length over pixel pitch of the simulated microscope, and the nominal value its operators type (2 % off). */
export const TRUE_LP = 20000;
export const NOMINAL_LP = 20400;

export interface MeasuredFilm {
  raster: Raster;
  mask: PixelMask;
  result: AnalysisResult;
  sha256: string;
}

function simulate(phases: SimulationSpec['phases'], seed: number, sizePx: number, halos = false): Raster {
  return simulatePattern({
    widthPx: sizePx,
    heightPx: sizePx,
    voltageV: 200e3,
    cameraLengthPx: TRUE_LP,
    frame: { centerXPx: sizePx / 2 - 0.9, centerYPx: sizePx / 2 - 6.4, axisRatio: 1.008, angleDeg: 25 },
    phases,
    peakCounts: 1500,
    ringFwhmPx: 3,
    background: { levelCounts: 300 },
    ...(halos ? { halos: amorphousCarbonHalos(120) } : {}),
    beamStop: { radiusPx: sizePx * 0.035, stemAngleDeg: 118, stemWidthPx: sizePx * 0.025, transmission: 0.02 },
    hotPixels: { count: 6 },
    seed,
  }).raster;
}

/** Analyses one simulated film with a camera of L/p = `lp` (calibrated or nominal). */
export function measureFilm(phases: SimulationSpec['phases'], seed: number, camera: { lp: number; sigmaPx: number; calibrated: boolean; source: string }, sizePx = 768, halos = false): MeasuredFilm {
  const raster = simulate(phases, seed, sizePx, halos);
  const cv = loadOpenCv();
  const image = { bitsPerSample: 16, sampleFormat: 'uint' as const };
  const result = analyze(
    raster,
    { camera: { voltageV: 200e3, cameraLengthPx: camera.lp, cameraLengthSigmaPx: camera.sigmaPx, source: camera.source, calibrated: camera.calibrated }, image, phases: phaseLibrary() },
    undefined,
    cv,
  );
  const mask = buildPatternMask(raster, cv, { image }).mask;
  const sha256 = createHash('sha256').update(new Uint8Array(raster.data.buffer, raster.data.byteOffset, raster.data.byteLength)).digest('hex');
  return { raster, mask, result, sha256 };
}

/** The lab's camera calibration on its gold standard, measured with the nominal camera. */
export function calibrateOnGold(seed = 7101): { calibration: CameraCalibration; summary: ReportCalibration } {
  const gold = findPhase('Au')!;
  const standard = measureFilm([{ phase: gold }], seed, { lp: NOMINAL_LP, sigmaPx: 0, calibrated: false, source: 'nominal: camera length 0.8 m, pixel 28 µm' }, 768, true);
  const outcome = calibrateCamera([standard.result], gold, { nominalCameraLengthPx: NOMINAL_LP });
  if (!outcome.ok) throw new Error(`the simulated gold standard did not calibrate: ${outcome.reason}`);
  const c = outcome.calibration;
  return {
    calibration: c,
    summary: { name: 'TEM2-200kV-0.8m', date: '2026-03-02', standard: 'Au (gold), evaporated film', cameraLengthPx: c.cameraLengthPx, cameraLengthSigmaPx: c.cameraLengthSigmaPx, instrument: 'TEM-2 north bay' },
  };
}

/** A TiN film (with extra phases, if any) measured with a calibration, and its check against TiN at 0.5 %. */
export function checkedTinFilm(calibration: CameraCalibration, seed: number, extra: SimulationSpec['phases'] = [], latticeScale = 1.0012): MeasuredFilm & { check: FilmCheck } {
  const tin = findPhase('TiN')!;
  const film = measureFilm([{ phase: tin, latticeScale }, ...extra], seed, {
    lp: calibration.cameraLengthPx,
    sigmaPx: calibration.cameraLengthSigmaPx,
    calibrated: true,
    source: 'calibration TEM2-200kV-0.8m',
  });
  return { ...film, check: checkFilm(film.result, tin, { tolerance: 0.005, library: phaseLibrary() }) };
}

/**
 * The gold calibration as the lab store would hold it (app/node/store CalibrationRecord),
 * for tests of what reads the store's records: the fit's kept rings as residuals, its
 * rejected rings with their reason, one image fingerprint.
 */
export function calibrationRecordOf(calibration: CameraCalibration, name = 'TEM2-200kV-0.8m'): CalibrationRecord {
  const kept = calibration.residuals.filter((r) => !r.rejected);
  return {
    name,
    instrument: 'TEM-2 north bay',
    voltageV: calibration.voltageV,
    nominalCameraLengthM: 0.8,
    pixelSizeM: 0.8 / NOMINAL_LP,
    created: '2026-03-02T09:15:00.000Z',
    standardPhaseId: calibration.standardPhaseId,
    cameraLengthPx: calibration.cameraLengthPx,
    cameraLengthSigmaPx: calibration.cameraLengthSigmaPx,
    axisRatio: calibration.distortion.axisRatio,
    axisRatioSigma: calibration.distortion.axisRatioSigma,
    angleDeg: calibration.distortion.angleDeg,
    angleSigmaDeg: calibration.distortion.angleSigmaDeg,
    residuals: kept.map((r) => ({ hkl: r.hkl, dA: r.dFitA, residualPpm: r.residualPpm, radiusPx: r.radiusPx, image: r.imageIndex })),
    imageFingerprints: [{ sha256: 'ab'.repeat(32), path: 'standards/au-0302.tif' }],
    rejectedRings: calibration.residuals
      .filter((r) => r.rejected)
      .map((r) => ({ hkl: r.hkl, dA: r.dFitA, radiusPx: r.radiusPx, residualPpm: r.residualPpm, image: r.imageIndex, reason: 'outlier by the fit rule' })),
    notes: '',
  };
}
