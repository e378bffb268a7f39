/**
 * The workspace's view of the backend: the same handlers whether they run behind the
 * loopback server (browser mode) or the Electron main process (desktop). Errors arrive
 * as BackendError with what is wrong and what to do.
 */
import type { BytesResult, CalibrationHistory, CalibrationList, CalibrationSummary, CheckRecordInput, HandlerErrorData, ImageFileMeta, PhaseHistory, SampleImageMeta, SampleSummary, SavedCalibration } from '../../handlers/contract';

export class BackendError extends Error {
  override name = 'BackendError';
  constructor(readonly data: HandlerErrorData) {
    super(data.message);
  }
}

export interface Backend {
  readonly kind: 'browser' | 'desktop';
  listSamples(): Promise<SampleSummary[]>;
  readSample(id: string): Promise<BytesResult<SampleImageMeta>>;
  fingerprintImage(name: string, bytes: Uint8Array): Promise<ImageFileMeta>;
  listCalibrations(): Promise<CalibrationList>;
  findCalibration(name: string): Promise<CalibrationSummary>;
  /** Saves a NewCalibration; a name already saved is refused (BackendError 'invalid-input'). */
  saveCalibration(calibration: Record<string, unknown>): Promise<SavedCalibration>;
  calibrationHistory(instrument: string | null): Promise<CalibrationHistory>;
  recordCheck(check: CheckRecordInput): Promise<{ id: number; created: string; storePath: string }>;
  phaseHistory(phase: string): Promise<PhaseHistory>;
  /**
   * Saves an export: a download in browser mode (under a fresh name), the save dialog in the
   * desktop app (which asks before replacing a file). Returns where it went, or null when cancelled.
   */
  saveExport(suggestedName: string, extension: 'pdf' | 'csv' | 'json' | 'png', bytes: Uint8Array): Promise<string | null>;
  /** The native open dialog (desktop only); null when cancelled. */
  openImageDialog?(): Promise<BytesResult<ImageFileMeta> | null>;
  /** Desktop menu commands; returns the unsubscribe function. */
  onMenuCommand?(listener: (command: string) => void): () => void;
}
