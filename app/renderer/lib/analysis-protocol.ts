/**
 * Messages between the workspace and its analysis worker (analysis-worker.ts). Plain
 * data and typed arrays only, so they cross postMessage unchanged; each carries the
 * job id it belongs to, and the workspace drops answers to jobs it has moved past.
 */
import type { CalibrationOutcome, CameraUncertaintyBudget } from '../../../core/calibration';
import type { AnalysisCamera, AnalysisResult, AnalysisStage } from '../../../core/pipeline';
import type { FilmCheck } from '../../../core/qa';
import type { ReportCalibration } from '../../common/report';
import type { PatternEdits } from './pattern-edits';

export type ToWorker =
  /** Decode the file and analyse it from scratch. */
  | { kind: 'analyze'; jobId: number; name: string; bytes: ArrayBuffer; camera: AnalysisCamera }
  /**
   * Rebuild the analysis of the held image from the user's edits (centre, excluded regions,
   * dropped and added rings) and this camera. `newRingPx`: the ring just asked for, whose
   * failed fit is an error (a ring asked for earlier that no longer fits becomes a warning).
   */
  | { kind: 'apply-edits'; jobId: number; edits: PatternEdits; camera: AnalysisCamera; newRingPx: number | null }
  /** The coarse profile with the centre here, while the user drags it (the exact one follows on release). */
  | { kind: 'preview-centre'; jobId: number; centerXPx: number; centerYPx: number }
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

export interface ProfileCurves {
  fitted: number[];
  residual: number[];
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
  /** `curves`: the fitted peaks over the background and the residual per profile bin (null when not computed); `addedRings`: indices of the rings fitted where the user asked. */
  | { kind: 'result'; jobId: number; result: AnalysisResult; elapsedMs: number; curves: ProfileCurves | null; addedRings: number[] }
  /** The coarse profile for a centre being dragged. */
  | { kind: 'preview'; jobId: number; centerXPx: number; centerYPx: number; radiusPx: number[]; mean: number[]; elapsedMs: number }
  /** The combined mask (1 = excluded), sent after the first result of an image. */
  | { kind: 'mask'; jobId: number; width: number; height: number; excluded: Uint8Array }
  | { kind: 'error'; jobId: number; message: string; reason: 'image' | 'settings' | 'no-image' | 'internal' }
  /** A calibration fit, and why it is not trusted (empty: trusted). */
  | { kind: 'calibration'; jobId: number; outcome: CalibrationOutcome; problems: string[]; elapsedMs: number }
  /** A film check and the analysis under the calibrated camera it was made on. */
  | { kind: 'check'; jobId: number; check: FilmCheck; result: AnalysisResult; elapsedMs: number }
  | { kind: 'export'; jobId: number; what: 'pdf' | 'png'; bytes: Uint8Array };
