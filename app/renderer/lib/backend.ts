/**
 * The workspace's view of the backend: the same handlers whether they run behind the
 * loopback server (browser mode) or the Electron main process (desktop). Errors arrive
 * as BackendError with what is wrong and what to do.
 */
import type { BytesResult, CalibrationList, CalibrationSummary, HandlerErrorData, ImageFileMeta, SampleImageMeta, SampleSummary } from '../../handlers/contract';

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
  /** The native open dialog (desktop only); null when cancelled. */
  openImageDialog?(): Promise<BytesResult<ImageFileMeta> | null>;
  /** Desktop menu commands; returns the unsubscribe function. */
  onMenuCommand?(listener: (command: string) => void): () => void;
}
