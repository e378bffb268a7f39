/**
 * The report files of one analysis or film check, written into a folder (what
 * `--report <dir>` of `annula analyze` and `annula check` writes):
 *
 *   <stem>.report.pdf   the PDF report (app/common/report/analysis-report.ts)
 *   <stem>.rings.csv    the ring table (app/common/report/ring-table-rows.ts)
 *   <stem>.analysis.json the full JSON: the analysis as `annula analyze --json` prints it,
 *     or, for a check, <stem>.check.json: the check's stable JSON (README, `check`)
 *
 * Nothing the user has is replaced: all three names are checked before anything is
 * built, and each file is written whole (temporary file, then link or rename) by
 * app/node/write-file-safely.ts; `force` replaces files of the same names. The folder is
 * created when missing (creating a folder never loses anything).
 *
 * Example (the other commands call it like this):
 *   const written = await writeReportFiles('reports/', { analysis: output, raster: image.raster,
 *     phase: tin, calibration: record, check }, { force: opts.force });
 *   io.out(`wrote ${written.pdf}, ${written.csv}, ${written.json}`);
 */
import { mkdir, readFile, stat } from 'node:fs/promises';
import { basename, extname, join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import type { CameraUncertaintyBudget } from '../../core/calibration/camera-uncertainty-budget';
import type { Phase } from '../../core/crystal/phase';
import { findPhase } from '../../core/crystal';
import type { Raster } from '../../core/image/raster';
import type { AnalysisResult } from '../../core/pipeline/analysis-result';
import type { FilmCheck } from '../../core/qa/film-check';
import type { PixelMask } from '../../core/rings/pixel-mask';
import { buildAnalysisReport, ringTableRows, RING_TABLE_COLUMNS, type ReportCalibration } from '../common/report';
import type { CalibrationRecord } from '../node/store';
import { UsageError } from './exit-codes';
import { refuseExisting, writeOutput } from './output-files';

/** An analysis as `annula analyze --json` prints it: the AnalysisResult, its image with the file's path and SHA-256. */
export type AnalysisOutput = Omit<AnalysisResult, 'image'> & {
  image: AnalysisResult['image'] & { path: string; sha256: string };
  /** The calibrated camera's uncertainty budget (image-analysis.ts), for the report's calibration section. */
  cameraUncertainty?: CameraUncertaintyBudget | null;
};

export interface ReportFilesInput {
  /** The analysis (the object analyze prints with --json). */
  analysis: AnalysisOutput;
  /** The image it measured (for the pattern picture in the PDF). */
  raster: Raster;
  /** The analysis mask, to tint masked pixels in the picture; optional. */
  mask?: PixelMask | null;
  /**
   * The chosen phase, whose predicted rings the picture and the profile show: the
   * expected phase of a check, or the phase asked for. Default: the check's expected
   * phase, else the best candidate's (found in `phases`, else the built-in library).
   */
  phase?: Phase | null;
  /** The phases the analysis matched against, to find the default phase in. */
  phases?: readonly Phase[];
  /** The calibration the analysis used: the store's record, or a summary (an internal standard); none says 'nominal camera'. */
  calibration?: CalibrationRecord | ReportCalibration | null;
  /** The film check, when the analysis was one: its verdict and reasons go into the PDF, and the JSON is the check's. */
  check?: FilmCheck | null;
  /** Sample id (default: the image's file name), operator. */
  sampleId?: string | null;
  operator?: string | null;
  /** When the analysis was made; default now. */
  date?: Date | string;
  /** The document to write as JSON; default the analysis, or for a check the check's stable JSON (checkJson). */
  json?: unknown;
}

export interface ReportFilesOptions {
  /** Replace files of the same names; default false (an existing file stops before anything is written). */
  force?: boolean;
  /** File-name stem; default the sample id (when given), else the image's base name. Give distinct stems in a batch. */
  stem?: string;
  /** Printed on every page; default the version in package.json. */
  annulaVersion?: string;
}

export interface ReportFilePaths {
  pdf: string;
  csv: string;
  json: string;
}

/** The calibration record as the report names it; a summary passes through. */
export function reportCalibration(calibration: CalibrationRecord | ReportCalibration): ReportCalibration {
  if (!('created' in calibration)) return calibration;
  const standard = findPhase(calibration.standardPhaseId);
  const rms = calibration.residuals.length ? Math.sqrt(calibration.residuals.reduce((s, r) => s + r.residualPpm ** 2, 0) / calibration.residuals.length) : null;
  return {
    name: calibration.name,
    date: calibration.created.slice(0, 10),
    standard: standard ? `${standard.id} (${standard.name})` : calibration.standardPhaseId,
    cameraLengthPx: calibration.cameraLengthPx,
    cameraLengthSigmaPx: calibration.cameraLengthSigmaPx,
    ...(calibration.instrument ? { instrument: calibration.instrument } : {}),
    details: {
      voltageV: calibration.voltageV,
      nominalCameraLengthM: calibration.nominalCameraLengthM,
      pixelSizeM: calibration.pixelSizeM,
      distortion: { axisRatio: calibration.axisRatio, axisRatioSigma: calibration.axisRatioSigma, angleDeg: calibration.angleDeg, angleSigmaDeg: calibration.angleSigmaDeg },
      ringsUsed: calibration.residuals.length,
      ringsRejected: calibration.rejectedRings.length,
      rmsResidualPpm: rms,
      imageCount: calibration.imageFingerprints.length,
      residuals: calibration.residuals.map((r) => ({ hkl: r.hkl, dA: r.dA, residualPpm: r.residualPpm })),
      rejected: calibration.rejectedRings.map((r) => r.reason),
    },
  };
}

/**
 * The stable JSON of a check (README, `check --json`): verdict, reasons, expected,
 * measured, unexplainedRings and missingRings as core/qa gives them, the calibration's
 * name (null without one) and the analysis as analyze prints it.
 */
export function checkJson(check: FilmCheck, calibrationName: string | null, analysis: AnalysisOutput): Record<string, unknown> {
  return {
    verdict: check.verdict,
    reasons: check.reasons,
    expected: check.expected,
    measured: check.measured,
    unexplainedRings: check.unexplainedRings,
    missingRings: check.missingRings,
    calibration: calibrationName,
    analysis,
  };
}

/** A file-name stem from a sample id: letters, digits, '.', '_' and '-' kept, anything else '_'. */
function safeStem(text: string): string {
  const s = text.trim().replace(/[^A-Za-z0-9._-]+/g, '_').replace(/^[.]+/, '');
  return s === '' ? 'analysis' : s.slice(0, 120);
}

/**
 * The three paths writeReportFiles writes, for checking them (refuseExisting) before
 * the analysis runs.
 * @param stem the file-name stem (see ReportFilesOptions.stem)
 * @param isCheck the JSON is a check's (<stem>.check.json) rather than an analysis's (<stem>.analysis.json)
 */
export function reportFilePaths(dir: string, stem: string, isCheck: boolean): ReportFilePaths {
  const s = safeStem(stem);
  return { pdf: join(dir, `${s}.report.pdf`), csv: join(dir, `${s}.rings.csv`), json: join(dir, `${s}.${isCheck ? 'check' : 'analysis'}.json`) };
}

/** The default stem: the sample id when given, else the image's base name without its extension. */
export function reportStem(imagePath: string, sampleId?: string | null): string {
  return sampleId?.trim() ? sampleId : basename(imagePath, extname(imagePath));
}

let packageVersion: string | null = null;
async function annulaVersion(): Promise<string> {
  if (packageVersion === null) {
    const pkg = JSON.parse(await readFile(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    packageVersion = pkg.version ?? 'unknown';
  }
  return packageVersion;
}

async function ensureFolder(dir: string): Promise<void> {
  try {
    const s = await stat(dir);
    if (!s.isDirectory()) throw new UsageError(`--report: ${dir} is a file, not a folder; give a folder for the report files`);
    return;
  } catch (error) {
    if (error instanceof UsageError) throw error;
  }
  try {
    await mkdir(dir, { recursive: true });
  } catch (error) {
    throw new UsageError(`--report: the folder ${dir} cannot be created (${(error as Error).message}); choose another folder`);
  }
}

/**
 * Writes the PDF report, the CSV ring table and the full JSON of one analysis into `dir`.
 * @param dir the folder (created when missing)
 * @returns the paths written
 * @throws UsageError (exit 2) when a file of one of the three names exists and `force` is not
 *   set (nothing is written then), or `dir` is a file; InputError (exit 3) when a file cannot
 *   be written (permission, full disk)
 */
export async function writeReportFiles(dir: string, input: ReportFilesInput, options: ReportFilesOptions = {}): Promise<ReportFilePaths> {
  const { analysis, check } = input;
  const force = options.force ?? false;
  const paths = reportFilePaths(dir, options.stem ?? reportStem(analysis.image.path, input.sampleId), Boolean(check));
  if (!force) await refuseExisting([paths.pdf, paths.csv, paths.json], '--report folder');
  await ensureFolder(dir);

  const calibration = input.calibration ? reportCalibration(input.calibration) : null;
  const { image, cameraUncertainty, ...rest } = analysis;
  const result: AnalysisResult = { ...rest, image: { width: image.width, height: image.height, bitsPerSample: image.bitsPerSample } };
  const pdf = await buildAnalysisReport({
    result,
    raster: input.raster,
    mask: input.mask ?? null,
    check: check ?? null,
    calibration,
    cameraUncertainty: cameraUncertainty ?? null,
    sampleId: input.sampleId?.trim() ? input.sampleId : basename(image.path),
    operator: input.operator ?? null,
    image: { path: image.path, sha256: image.sha256 },
    annulaVersion: options.annulaVersion ?? (await annulaVersion()),
    date: input.date ?? new Date(),
    ...(input.phase !== undefined ? { predictedPhase: input.phase } : {}),
    ...(input.phases ? { phases: input.phases } : {}),
  });
  const rows = ringTableRows(result);
  const csv = stringify(rows, { header: true, columns: [...RING_TABLE_COLUMNS] });
  const json = input.json ?? (check ? checkJson(check, calibration?.name ?? null, analysis) : analysis);

  await writeOutput(paths.pdf, pdf, force);
  await writeOutput(paths.csv, csv, force);
  await writeOutput(paths.json, JSON.stringify(json, null, 2) + '\n', force);
  return paths;
}
