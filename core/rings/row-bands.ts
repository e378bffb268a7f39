/**
 * Pixel passes cut into bands of rows, so a surface can run them on several
 * threads (Node worker_threads, browser Web Workers) while core stays
 * single-threaded and platform-free.
 *
 * A pass is a function (images, params, band) -> partial result whose inputs
 * and output are plain data (typed arrays, numbers, plain objects), listed by
 * name in row-band-passes.ts. Partial results over disjoint bands merge into the
 * result over the whole image (the merge belongs to each pass: sums of
 * histograms, concatenated lists). A RowBandRunner runs one pass on several
 * bands and returns the partial results in band order; it is synchronous, so
 * the pipeline keeps one synchronous call path (a pool blocks on its workers
 * with Atomics.wait, which Node's main thread and every Web Worker allow).
 *
 * Without a runner, or for a small image, the pass runs here over all rows at
 * once: the single-threaded default.
 */
import type { Raster } from '../image/raster';
import type { PixelMask } from './pixel-mask';
import type { RowBandPasses } from './row-band-passes';

/** Rows [rowStart, rowEnd) of an image. */
export interface RowBand {
  rowStart: number;
  rowEnd: number;
}

/** The pixels a pass reads (never mutated by a pass). */
export interface RowBandImages {
  raster: Raster;
  mask: PixelMask | null;
}

export type RowBandPassName = keyof RowBandPasses;
export type RowBandParams<N extends RowBandPassName> = Parameters<RowBandPasses[N]>[1];
export type RowBandResult<N extends RowBandPassName> = ReturnType<RowBandPasses[N]>;

/** Runs passes on bands of rows, possibly in parallel. */
export interface RowBandRunner {
  /** How many bands a pass should be cut into (the threads the runner uses, this one included), >= 1. */
  readonly bandCount: number;
  /**
   * Runs pass `pass` with `params` over each band and returns the partial results in
   * band order. Synchronous; throws what a pass throws.
   */
  run<N extends RowBandPassName>(pass: N, images: RowBandImages, params: RowBandParams<N>, bands: readonly RowBand[]): RowBandResult<N>[];
}

/** Fewest pixels worth a band of their own (below this, handing work to a thread costs more than it saves). */
export const MIN_BAND_PIXELS = 1 << 18;

/**
 * `count` bands of consecutive rows covering [0, height), as equal as whole rows allow.
 * @throws RangeError unless height >= 0 and count >= 1 are integers
 */
export function splitRows(height: number, count: number): RowBand[] {
  if (!Number.isInteger(height) || height < 0) throw new RangeError(`height must be an integer >= 0; got ${height}`);
  if (!Number.isInteger(count) || count < 1) throw new RangeError(`count must be an integer >= 1; got ${count}`);
  const n = Math.max(1, Math.min(count, height));
  const bands: RowBand[] = [];
  for (let k = 0; k < n; k++) bands.push({ rowStart: Math.round((k * height) / n), rowEnd: Math.round(((k + 1) * height) / n) });
  return bands;
}

/**
 * Runs `pass` over the whole image: on the runner's bands when there is a runner
 * with more than one thread and the image is large enough, else here in one band
 * with `local` (the pass itself, passed in so this module needs no registry).
 * @returns the partial results, in band order (one element without a runner)
 */
export function runRowBands<N extends RowBandPassName>(
  runner: RowBandRunner | undefined,
  pass: N,
  images: RowBandImages,
  params: RowBandParams<N>,
  height: number,
  local: (images: RowBandImages, params: RowBandParams<N>, band: RowBand) => RowBandResult<N>,
): RowBandResult<N>[] {
  const pixels = images.raster.width * height;
  const count = runner ? Math.min(runner.bandCount, Math.floor(pixels / MIN_BAND_PIXELS)) : 1;
  if (!runner || count <= 1) return [local(images, params, { rowStart: 0, rowEnd: height })];
  return runner.run(pass, images, params, splitRows(height, count));
}
