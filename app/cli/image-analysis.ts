/**
 * Analysing one pattern from the command line, shared by `analyze`, `calibrate` and
 * `check`: the image argument (a file, or a sample folder with its recorded camera),
 * the options that shape the analysis (phases, mask, centre, page), reading the image,
 * the row-band pool for the pixel passes, core's analyze(), and the documented output
 * object (README, "analyze" JSON keys).
 */
import { readFile, stat } from 'node:fs/promises';
import { join } from 'node:path';
import type { CameraUncertaintyBudget } from '../../core/calibration';
import type { Hkl, Phase } from '../../core/crystal';
import { analyze, type AnalysisCamera, type AnalysisResult, type AnalysisStage } from '../../core/pipeline';
import { parseMaskPolygons, type MaskPolygon } from '../../core/rings';
import { loadOpenCv } from '../node/load-opencv';
import type { ImageFile } from '../node/read-image-file';
import { processRowBandPool } from '../node/row-band-pool';
import type { Command } from 'commander';
import type { CameraFlags, CameraSettings } from './camera-options';
import type { CliIo } from './cli-io';
import { InputError, UsageError } from './exit-codes';
import { collectPhases, resolvePhaseArgument } from './phase-sources';
import { readImageArgument } from './read-image-argument';

/** The camera settings a sample folder's sample.json records (texts with units, as typed). */
export interface SampleCamera {
  voltage?: string;
  cameraLength?: string;
  pixelSize?: string;
}

/** An image named on the command line: the image file, and the sample folder's settings when it was one. */
export interface ImageInput {
  /** The argument as given. */
  argument: string;
  imagePath: string;
  /** Null for a plain image file. */
  sample: { folder: string; camera: SampleCamera } | null;
}

/**
 * Resolves an image argument: a sample folder (a folder holding sample.json, e.g.
 * samples/gold-standard) gives its image and recorded camera; anything else is taken as
 * an image file (read later, which reports a missing file).
 * @throws InputError for a folder without a readable sample.json, or one without "image"
 */
export async function resolveImageInput(argument: string): Promise<ImageInput> {
  let isFolder = false;
  try {
    isFolder = (await stat(argument)).isDirectory();
  } catch {
    return { argument, imagePath: argument, sample: null }; // not there: readImageArgument reports it
  }
  if (!isFolder) return { argument, imagePath: argument, sample: null };
  const file = join(argument, 'sample.json');
  let json: { image?: unknown; camera?: Record<string, unknown> };
  try {
    json = JSON.parse(await readFile(file, 'utf8'));
  } catch {
    throw new InputError(`${argument} is a folder without a readable sample.json; give an image file, or a sample folder such as samples/gold-standard`);
  }
  if (typeof json.image !== 'string') throw new InputError(`${file}: "image" (the pattern's file name) is missing`);
  const text = (v: unknown): string | undefined => (typeof v === 'string' ? v : undefined);
  return {
    argument,
    imagePath: join(argument, json.image),
    sample: { folder: argument, camera: { voltage: text(json.camera?.voltage), cameraLength: text(json.camera?.cameraLength), pixelSize: text(json.camera?.pixelSize) } },
  };
}

/**
 * The camera flags with a sample folder's recorded settings filled in where the command
 * line gives none (a --scale on the command line keeps the sample's length and pixel out).
 * `flags` is not mutated.
 */
export function withSampleCamera<T extends CameraFlags>(flags: T, input: ImageInput): T {
  const sample = input.sample?.camera;
  if (!sample) return flags;
  const merged: T = { ...flags };
  merged.voltage ??= sample.voltage;
  if (merged.scale === undefined) {
    merged.cameraLength ??= sample.cameraLength;
    merged.pixelSize ??= sample.pixelSize;
  }
  return merged;
}

/** The command-line options that shape an analysis (the camera aside). */
export interface AnalysisShapeOptions {
  phase?: string[];
  phases?: string[];
  mask?: string;
  center?: string;
  page?: string;
  distortion: boolean;
  beamStop: boolean;
}

/** What those options say, read and checked once before any image is read. */
export interface AnalysisShape {
  /** The phases to match (the library and the user's files, or only those named by --phase). */
  phases: Phase[];
  /** The library with the user's phase files (for naming second phases and expected phases). */
  library: Phase[];
  /** Notes from reading the phase files (renamed ids). */
  notes: string[];
  polygons?: MaskPolygon[];
  start?: { x: number; y: number };
  page?: number;
  fitDistortion: boolean;
  detectBeamStop: boolean;
}

/** Adds --phase and --phases (unless `phaseOptions` is false), --mask, --center, --page, --no-distortion and --no-beam-stop. */
export function addAnalysisShapeOptions(command: Command, phaseOptions = true): Command {
  const collect = (value: string, list: string[] | undefined): string[] => [...(list ?? []), value];
  if (phaseOptions) {
    command
      .option('--phase <id>', 'match only this phase (library id or name, or a .cif/.json file); repeat for several', collect)
      .option('--phases <files...>', 'add phases from CIF or JSON files to the library');
  }
  return command
    .option('--mask <file.json>', 'regions to exclude: [{ "points": [[x, y], ...] }, ...] in pixel coordinates')
    .option('--center <x,y>', 'start the centre search here (pixels), e.g. when the pattern is faint')
    .option('--page <n>', 'page of a multi-page TIFF, from 0', undefined)
    .option('--no-distortion', 'fit circles only (no elliptical distortion)')
    .option('--no-beam-stop', 'do not look for a beam stop');
}

async function readMask(path: string): Promise<MaskPolygon[]> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch {
    throw new InputError(`mask file "${path}" cannot be read; check the path`);
  }
  try {
    return parseMaskPolygons(JSON.parse(text));
  } catch (e) {
    throw new InputError(`mask file "${path}": ${(e as Error).message}`);
  }
}

function readCenter(text: string): { x: number; y: number } {
  const parts = text.split(',').map((s) => Number(s.trim()));
  if (parts.length !== 2 || parts.some((v) => !Number.isFinite(v))) {
    throw new UsageError(`--center: "${text}" is not two numbers x,y in pixels, e.g. --center 1024.5,1010`);
  }
  return { x: parts[0]!, y: parts[1]! };
}

/**
 * Reads --phase, --phases, --mask, --center, --page, --no-distortion and --no-beam-stop.
 * @throws UsageError or InputError naming the option and what to do
 */
export async function readAnalysisShape(opts: AnalysisShapeOptions): Promise<AnalysisShape> {
  const page = opts.page === undefined ? undefined : Number(opts.page);
  if (page !== undefined && !(Number.isInteger(page) && page >= 0)) throw new UsageError(`--page: "${opts.page}" is not a page number (0, 1, 2, ...)`);
  const notes: string[] = [];
  const library = collectPhases(opts.phases ?? [], notes);
  const phases: Phase[] = opts.phase ? opts.phase.map((p) => resolvePhaseArgument(p, library.filter((x) => x.origin !== 'library'))) : library;
  const polygons = opts.mask ? await readMask(opts.mask) : undefined;
  const start = opts.center ? readCenter(opts.center) : undefined;
  return {
    phases,
    library,
    notes,
    ...(polygons ? { polygons } : {}),
    ...(start ? { start } : {}),
    ...(page !== undefined ? { page } : {}),
    fitDistortion: opts.distortion,
    detectBeamStop: opts.beamStop,
  };
}

/** How a nominal camera was described, for the record ("nominal: camera length 0.8 m, pixel 28 µm"). */
export function nominalCameraSource(camera: CameraSettings): string {
  const described = camera.described;
  if (described && 'cameraLengthM' in described) return `nominal: camera length ${described.cameraLengthM} m, pixel ${described.pixelSizeM * 1e6} µm`;
  return `nominal: reciprocal scale ${described && 'scalePerNmPerPx' in described ? described.scalePerNmPerPx : '?'} /nm per px`;
}

const STAGE_WORDS: Record<AnalysisStage, string> = {
  masks: 'masking saturated, hot and beam-stop pixels',
  geometry: 'finding the centre and distortion',
  profile: 'measuring the rings',
  'd-spacings': 'computing d-spacings',
  indexing: 'indexing',
};

/** Stage lines on stderr ("annula <command>: measuring the rings (1.2 s)"), from the first stage that starts more than a second after the run began. */
export function stageReporter(io: CliIo, command: string, quiet: boolean): (stage: AnalysisStage, fraction: number) => void {
  const started = Date.now();
  return (stage, fraction) => {
    if (quiet || fraction !== 0 || Date.now() - started < 1000) return;
    io.err(`annula ${command}: ${STAGE_WORDS[stage]} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
  };
}

/** One analysis of one image file. */
export interface ImageAnalysisRequest {
  imagePath: string;
  camera: AnalysisCamera;
  shape: AnalysisShape;
  /** Phases to match instead of shape.phases (calibrate matches only the standard). */
  phases?: readonly Phase[];
  onProgress?: (stage: AnalysisStage, fraction: number) => void;
}

export interface ImageAnalysis {
  image: ImageFile;
  result: AnalysisResult;
}

/**
 * Reads the image and analyses it. The pixel passes run on the process's row-band pool
 * (its threads boot while the image is read; a pass that finds them not ready runs here,
 * and the results never depend on it).
 * @throws InputError for an image that cannot be read or decoded
 */
export async function analyzeImageFile(request: ImageAnalysisRequest): Promise<ImageAnalysis> {
  const { shape } = request;
  const pool = processRowBandPool();
  const image = await readImageArgument(request.imagePath, shape.page);
  const result = analyze(
    pool.share(image.raster),
    {
      camera: request.camera,
      image: { bitsPerSample: image.info.bitsPerSample, sampleFormat: image.info.sampleFormat },
      phases: request.phases ?? shape.phases,
      ...(shape.polygons ? { maskPolygons: shape.polygons } : {}),
      ...(shape.start ? { startFrame: { centerXPx: shape.start.x, centerYPx: shape.start.y, axisRatio: 1, angleDeg: 0 } } : {}),
      fitDistortion: shape.fitDistortion,
      detectBeamStop: shape.detectBeamStop,
    },
    request.onProgress,
    loadOpenCv(),
    { rowBands: pool },
  );
  return { image, result };
}

/** Which rings of the image an internal standard claimed, and the camera fitted on them. */
export interface InternalStandardSummary {
  phase: string;
  /** Indices into `rings` (0-based, as in candidates' ringIndex) of the standard's rings. */
  ringIndices: number[];
  cameraLengthPx: number;
  cameraLengthSigmaPx: number;
  /** Each standard ring's residual against its reference spacing, ppm of d (rejected outliers flagged). */
  residuals: Array<{ ringIndex: number; hkl: Hkl; residualPpm: number; rejected: boolean }>;
}

/** The documented output of an analysis (README, "analyze" JSON keys): image first, then the result. */
export type AnalysisOutput = Omit<AnalysisResult, 'image'> & {
  image: { path: string; width: number; height: number; bitsPerSample: number; sha256: string };
  /** Name of the stored calibration whose camera was used, or null. */
  calibration: string | null;
  /** The internal standard the camera was fitted on in this image, or null. */
  internalStandard: InternalStandardSummary | null;
  /**
   * The calibrated camera's uncertainty budget (relative standard uncertainties: fit, the
   * standard's reference a, the transfer to this image, and their root sum of squares, which
   * is camera.cameraLengthSigmaPx / camera.cameraLengthPx); null for a nominal camera.
   */
  cameraUncertainty: CameraUncertaintyBudget | null;
};

/**
 * The output object: image (with the file's path and fingerprint) first, the camera
 * followed by the calibration used, then the rest as analyze returns it; warnings are the
 * image reader's, `extraWarnings` (phase files, calibration checks) and the analysis's.
 */
export function analysisOutput(
  analysis: ImageAnalysis,
  imagePath: string,
  extras: { calibration?: string | null; internalStandard?: InternalStandardSummary | null; cameraUncertainty?: CameraUncertaintyBudget | null; extraWarnings?: readonly string[] } = {},
): AnalysisOutput {
  const { image: imageSummary, voltageV, wavelengthA, camera, ...rest } = analysis.result;
  return {
    image: { path: imagePath, ...imageSummary, sha256: analysis.image.sha256 },
    voltageV,
    wavelengthA,
    camera,
    calibration: extras.calibration ?? null,
    internalStandard: extras.internalStandard ?? null,
    cameraUncertainty: extras.cameraUncertainty ?? null,
    ...rest,
    warnings: [...analysis.image.info.warnings, ...(extras.extraWarnings ?? []), ...rest.warnings],
  };
}
