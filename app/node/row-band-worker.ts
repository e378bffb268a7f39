/**
 * One thread of a RowBandPool (row-band-pool.ts): runs the pixel passes of
 * core/rings/row-band-passes.ts on the band of rows it is given, over images in
 * shared memory, and answers on its own port, then raises its signal so the
 * waiting thread (blocked in Atomics.wait) wakes.
 *
 * Started through row-band-worker-boot.js, which registers tsx first.
 */
import { parentPort, workerData, type MessagePort } from 'node:worker_threads';
import { ROW_BAND_PASSES } from '../../core/rings/row-band-passes';
import type { RowBandTask, RowBandWorkerData } from './row-band-protocol';

const { port, signal } = workerData as RowBandWorkerData & { port: MessagePort };

/** The pass table by name (a plain object: names come from our own pool only). */
const passes = ROW_BAND_PASSES as unknown as Record<string, (images: unknown, params: unknown, band: unknown) => unknown>;

function answer(message: unknown): void {
  port.postMessage(message);
  Atomics.store(signal, 0, 1);
  Atomics.notify(signal, 0);
}

parentPort!.on('message', (task: RowBandTask) => {
  try {
    const pass = passes[task.pass];
    if (!pass) throw new Error(`unknown row-band pass "${task.pass}"`);
    const result = pass({ raster: task.raster, mask: task.mask }, task.params, task.band);
    answer({ seq: task.seq, ok: true, result });
  } catch (error) {
    const e = error instanceof Error ? error : new Error(String(error));
    answer({ seq: task.seq, ok: false, name: e.name, message: e.message });
  }
});

// Ready: the pool hands this thread work from now on.
Atomics.store(signal, 1, 1);
