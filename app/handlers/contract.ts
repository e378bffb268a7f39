/**
 * The backend contract shared by every transport (loopback HTTP, Electron IPC) and the
 * renderer. Types only and plain data: this file imports nothing at run time, so the
 * renderer may `import type` from it without pulling Node code into the browser bundle.
 *
 * A handler's result is JSON-able data, or JSON-able metadata with one byte payload
 * (`BytesResult`): HTTP sends the bytes as the body and the metadata in a header, IPC
 * passes both through the structured clone unchanged.
 */
import type { CalibrationDrift } from '../node/store/calibration-drift';
import type { AnalysisSummary, CalibrationRecord, Verdict } from '../node/store/store-records';

/** Why a handler refused or failed; transports map these to HTTP statuses. */
export type HandlerErrorCode =
  | 'invalid-input' // the request does not match the handler's schema
  | 'unknown-handler' // no handler of that name
  | 'not-allowed' // e.g. a path the user did not choose
  | 'not-found' // a sample, calibration or file that is not there
  | 'unreadable' // a file or store that cannot be read
  | 'not-available' // planned, not in this version (the message says which command does it)
  | 'internal'; // a defect in Annula

/** An error as it crosses a transport: what is wrong and what to do, and both joined. */
export interface HandlerErrorData {
  code: HandlerErrorCode;
  /** What is wrong. */
  problem: string;
  /** What to do about it. */
  action: string;
  /** `<problem>; <action>`, ready to show. */
  message: string;
}

/** Metadata with one byte payload (an image file's bytes). */
export interface BytesResult<M> {
  meta: M;
  bytes: Uint8Array;
}

/** The camera a sample or an image comes with, as the user would type it ("200kV", "0.8m", "28um"). */
export interface CameraText {
  voltage: string;
  cameraLength: string;
  pixelSize: string;
}

export interface SampleSummary {
  /** Folder name under samples/, e.g. "gold-standard". */
  id: string;
  title: string;
  scenario: string;
  camera: CameraText | null;
  expected: { phase: string; aA: number } | null;
}

export interface ImageFileMeta {
  /** File name shown to the user (no folders). */
  name: string;
  byteLength: number;
  /** SHA-256 of the bytes, 64 hex digits (FIPS 180-4), for the lab's records. */
  sha256: string;
}

export interface SampleImageMeta extends ImageFileMeta {
  sample: SampleSummary;
}

/** A calibration as the workspace lists it (a subset of the store's record). */
export type CalibrationSummary = Pick<
  CalibrationRecord,
  'name' | 'instrument' | 'voltageV' | 'nominalCameraLengthM' | 'pixelSizeM' | 'created' | 'standardPhaseId' | 'cameraLengthPx' | 'cameraLengthSigmaPx' | 'axisRatio' | 'angleDeg'
>;

export interface CalibrationList {
  /** Where the store is (absolute path) and whether a file is there yet. */
  storePath: string;
  storeFound: boolean;
  calibrations: CalibrationSummary[];
}

/** The drift check of a calibration against the previous one at the same setting (app/node/store calibrationDrift). */
export type CalibrationDriftData = CalibrationDrift;

/** What save-calibration did: the saved calibration and its drift check (null without a previous one). */
export interface SavedCalibration {
  calibration: CalibrationSummary;
  instrumentAdded: boolean;
  drift: CalibrationDriftData | null;
  storePath: string;
}

/** A calibration in an instrument's history, with its drift against the one before it. */
export interface CalibrationHistoryEntry extends CalibrationSummary {
  ringsUsed: number;
  ringsRejected: number;
  drift: CalibrationDriftData | null;
}

export interface CalibrationHistory {
  storePath: string;
  storeFound: boolean;
  /** Null: every calibration recorded without an instrument. */
  instrument: string | null;
  /** Oldest first. */
  calibrations: CalibrationHistoryEntry[];
}

export type VerdictText = Verdict;

/** A check to record (the store's NewAnalysis, every field as the workspace sends it). */
export interface CheckRecordInput {
  sampleId: string | null;
  operator: string | null;
  imageSha256: string;
  imagePath: string | null;
  calibration: string | null;
  phase: string;
  aA: number | null;
  aSigmaA: number | null;
  verdict: VerdictText;
  tolerance: number;
  /** The full result (the check JSON, as `annula check --json` writes it). */
  result: unknown;
}

/** An analysis as the phase history lists it (the store's own summary). */
export type AnalysisSummaryData = AnalysisSummary;

export interface PhaseHistory {
  storePath: string;
  storeFound: boolean;
  phase: string;
  /** Oldest first. */
  analyses: AnalysisSummaryData[];
}

/** A file written by write-report (desktop: to the path the user chose in the save dialog). */
export interface WrittenFile {
  path: string;
  byteLength: number;
}

/** Inputs and outputs of every handler, by name: the typed contract both sides use. */
export interface HandlerMap {
  'list-samples': { input: Record<string, never>; output: SampleSummary[] };
  'read-sample': { input: { id: string }; output: BytesResult<SampleImageMeta> };
  'read-chosen-image': { input: { path: string }; output: BytesResult<ImageFileMeta> };
  'fingerprint-image': { input: { name: string; bytes: Uint8Array }; output: ImageFileMeta };
  'list-calibrations': { input: { instrument?: string; voltageV?: number }; output: CalibrationList };
  'find-calibration': { input: { name: string }; output: CalibrationSummary };
  /** The input is a NewCalibration (app/node/store), validated by the store's schema. */
  'save-calibration': { input: { calibration: Record<string, unknown> }; output: SavedCalibration };
  'calibration-history': { input: { instrument: string | null; voltageV?: number }; output: CalibrationHistory };
  'record-check': { input: CheckRecordInput; output: { id: number; created: string; storePath: string } };
  'phase-history': { input: { phase: string; since?: string }; output: PhaseHistory };
  'write-report': { input: { path: string; bytes: Uint8Array }; output: WrittenFile };
}

export type HandlerName = keyof HandlerMap;

/**
 * Handlers planned but not in this version: every transport answers them with
 * 'not-available' and the CLI command that does the job. Empty now: the calibration and
 * check flows' handlers are served.
 */
export const PLANNED_HANDLERS: Readonly<Record<string, string>> = {};
