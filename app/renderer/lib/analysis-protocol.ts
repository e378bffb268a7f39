/**
 * Messages between the workspace and its analysis worker (analysis-worker.ts). Plain
 * data and typed arrays only, so they cross postMessage unchanged; each carries the
 * job id it belongs to, and the workspace drops answers to jobs it has moved past.
 */
import type { CalibrationOutcome, CameraUncertaintyBudget } from '../../../core/calibration';
import type { AnalysisCamera, AnalysisResult, AnalysisStage } from '../../../core/pipeline';
import type { FilmCheck } from '../../../core/qa';
import type { ReportCalibration } from '../../common/report';

export type ToWorker =
  /** Decode the file and analyse it from scratch. */
  | { kind: 'analyze'; jobId: number; name: string; bytes: ArrayBuffer; camera: AnalysisCamera }
  /** Same rings, another camera (voltage, camera length, pixel size or a calibration). */
  | { kind: 'recamera'; jobId: number; camera: AnalysisCamera }
  /** Re-measure the profile and rings with the centre here (the user dragged it). */
  | { kind: 'move-centre'; jobId: number; centerXPx: number; centerYPx: number }
  /** Fit the camera on the held pattern's rings of a standard phase (`annula calibrate`'s fit). */
  | { kind: 'calibrate'; jobId: number; standardId: string; nominalCameraLengthPx: number | null }
  /** Apply a calibrated camera (with its budget) to the held pattern and check it against a phase (core/qa checkFilm). */
  | { kind: 'check'; jobId: number; camera: AnalysisCamera; budget: CameraUncertaintyBudget; expectedId: string; tolerance: number }
  /** Build an export of the held pattern: the PDF report or the PNG of the image with its overlays. */
  | { kind: 'export'; jobId: number; what: 'pdf' | 'png'; report: ReportRequest };

/** What the PDF report needs beyond what the worker holds. */
export interface ReportRequest {
  sampleId: string;
  operator: string | null;
  image: { path: string; sha256: string };
  check: FilmCheck | null;
  calibration: ReportCalibration | null;
  cameraUncertainty: CameraUncertaintyBudget | null;
  predictedPhaseId: string | null;
  /** ISO date of the analysis. */
  date: string;
}

export interface DecodedImageSummary {
  name: string;
  width: number;
  height: number;
  format: string;
  bitsPerSample: number;
  sampleFormat: string;
  warnings: string[];
}

export type FromWorker =
  | { kind: 'ready' }
  | { kind: 'progress'; jobId: number; stage: AnalysisStage | 'decoding' | 'loading'; fraction: number }
  /** The decoded pixels (a copy; the worker keeps its own for re-runs). */
  | { kind: 'image'; jobId: number; image: DecodedImageSummary; data: Float32Array }
  | { kind: 'result'; jobId: number; result: AnalysisResult; elapsedMs: number }
  /** The combined mask (1 = excluded), sent after the first result of an image. */
  | { kind: 'mask'; jobId: number; width: number; height: number; excluded: Uint8Array }
  | { kind: 'error'; jobId: number; message: string; reason: 'image' | 'settings' | 'no-image' | 'internal' }
  /** A calibration fit, and why it is not trusted (empty: trusted). */
  | { kind: 'calibration'; jobId: number; outcome: CalibrationOutcome; problems: string[]; elapsedMs: number }
  /** A film check and the analysis under the calibrated camera it was made on. */
  | { kind: 'check'; jobId: number; check: FilmCheck; result: AnalysisResult; elapsedMs: number }
  | { kind: 'export'; jobId: number; what: 'pdf' | 'png'; bytes: Uint8Array };
