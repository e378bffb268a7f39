/** Messages between a RowBandPool and its threads (row-band-pool.ts, row-band-worker.ts). */
import type { Raster } from '../../core/image/raster';
import type { PixelMask } from '../../core/rings/pixel-mask';
import type { RowBand } from '../../core/rings/row-bands';

/** What a thread gets at start (with its answer port, transferred). */
export interface RowBandWorkerData {
  /** [0] the answer flag (1: an answer waits on the port), [1] the ready flag (1: booted). */
  signal: Int32Array;
}

/** One band of one pass; raster and mask live in shared memory. */
export interface RowBandTask {
  seq: number;
  pass: string;
  params: unknown;
  band: RowBand;
  raster: Raster;
  mask: PixelMask | null;
}

export type RowBandAnswer =
  | { seq: number; ok: true; result: unknown }
  | { seq: number; ok: false; name: string; message: string };
