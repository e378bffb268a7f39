/**
 * Messages between the workspace and its analysis worker (analysis-worker.ts). Plain
 * data and typed arrays only, so they cross postMessage unchanged; each carries the
 * job id it belongs to, and the workspace drops answers to jobs it has moved past.
 */
import type { AnalysisCamera, AnalysisResult, AnalysisStage } from '../../../core/pipeline';

export type ToWorker =
  /** Decode the file and analyse it from scratch. */
  | { kind: 'analyze'; jobId: number; name: string; bytes: ArrayBuffer; camera: AnalysisCamera }
  /** Same rings, another camera (voltage, camera length, pixel size or a calibration). */
  | { kind: 'recamera'; jobId: number; camera: AnalysisCamera }
  /** Re-measure the profile and rings with the centre here (the user dragged it). */
  | { kind: 'move-centre'; jobId: number; centerXPx: number; centerYPx: number };

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
  | { kind: 'error'; jobId: number; message: string; reason: 'image' | 'settings' | 'no-image' | 'internal' };
