/**
 * A pool of Node worker threads that runs core's row-band passes
 * (core/rings/row-band-passes.ts) in parallel: a RowBandRunner for the Node
 * surfaces (the CLI, tests, the Electron main process).
 *
 * How a pass runs: the images are put in shared memory (SharedArrayBuffer; an
 * image already there is used as it is, one that is not is copied for the
 * call: share() it once to avoid that), each ready thread gets one band in a
 * message, this thread computes the first band itself, then blocks on each
 * thread's signal (Atomics.wait) and takes its answer off the thread's port
 * with receiveMessageOnPort. So run() is synchronous and core's call path stays
 * synchronous. A thread that is not booted yet, or that died, is simply not
 * used: its band runs here, so the results never depend on the pool's state
 * (only the time does).
 *
 * Threads are unref'd: a process that forgets close() still exits.
 */
import { availableParallelism } from 'node:os';
import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import type { Raster } from '../../core/image/raster';
import { ROW_BAND_PASSES } from '../../core/rings/row-band-passes';
import type { RowBand, RowBandImages, RowBandParams, RowBandPassName, RowBandResult, RowBandRunner } from '../../core/rings/row-bands';
import type { RowBandAnswer, RowBandTask, RowBandWorkerData } from './row-band-protocol';

export interface RowBandPoolOptions {
  /**
   * Threads in all, this one included, integer 1..64 (default: the machine's available
   * parallelism, at most 8). 1 makes a pool that runs every band here.
   */
  threads?: number;
}

export interface RowBandPool extends RowBandRunner {
  /** The image with its samples in shared memory (a copy, unless they are there already). */
  share(raster: Raster): Raster;
  /** Resolves when every thread has booted (or failed to); run() does not need to wait for it. */
  ready(): Promise<void>;
  /** Threads booted and alive now, this one included. */
  liveThreads(): number;
  /** Stops the threads; later runs compute every band here. */
  close(): Promise<void>;
}

interface Thread {
  worker: Worker;
  port: MessagePort;
  /** [0] answer waiting, [1] booted. */
  signal: Int32Array;
  failed: boolean;
}

const local = ROW_BAND_PASSES as unknown as Record<string, (images: RowBandImages, params: unknown, band: RowBand) => unknown>;

/** `a` itself when its memory is shared, else a copy in shared memory. */
function inSharedMemory<T extends Float32Array | Uint8Array>(a: T): T {
  if (a.buffer instanceof SharedArrayBuffer) return a;
  const copy = (a instanceof Float32Array ? new Float32Array(new SharedArrayBuffer(a.byteLength)) : new Uint8Array(new SharedArrayBuffer(a.byteLength))) as T;
  copy.set(a);
  return copy;
}

/**
 * Shared memory for the copies one run() needs, kept between runs: the pipeline hands
 * several passes in a row the same unshared mask, and a fresh 16 MiB buffer per pass
 * (allocation, zeroing, page faults, garbage) cost more than copying into the same one.
 * Safe because run() is synchronous: the threads are done with a copy before it returns.
 */
class SharedScratch {
  private floats: Float32Array | null = null;
  private bytes: Uint8Array | null = null;

  /** `a` itself when its memory is shared, else its values copied into this scratch's buffer of its type. */
  hold<T extends Float32Array | Uint8Array>(a: T): T {
    if (a.buffer instanceof SharedArrayBuffer) return a;
    if (a instanceof Float32Array) {
      if (this.floats?.length !== a.length) this.floats = new Float32Array(new SharedArrayBuffer(a.byteLength));
      this.floats.set(a);
      return this.floats as T;
    }
    if (this.bytes?.length !== a.length) this.bytes = new Uint8Array(new SharedArrayBuffer(a.byteLength));
    this.bytes.set(a);
    return this.bytes as T;
  }
}

/**
 * Starts a pool.
 * @throws RangeError for a thread count that is not an integer from 1 to 64
 */
export function startRowBandPool(options: RowBandPoolOptions = {}): RowBandPool {
  const threads = options.threads ?? Math.max(1, Math.min(8, availableParallelism()));
  if (!Number.isInteger(threads) || threads < 1 || threads > 64) throw new RangeError(`threads must be an integer from 1 to 64; got ${threads}`);
  const pool: Thread[] = [];
  for (let k = 1; k < threads; k++) pool.push(startThread());
  let seq = 0;
  let closed = false;
  const scratch = new SharedScratch();

  const alive = (t: Thread) => !t.failed && t.worker.threadId !== -1 && Atomics.load(t.signal, 1) === 1;

  function run<N extends RowBandPassName>(pass: N, images: RowBandImages, params: RowBandParams<N>, bands: readonly RowBand[]): RowBandResult<N>[] {
    const fn = local[pass];
    if (!fn) throw new RangeError(`unknown row-band pass "${String(pass)}"`);
    const results: unknown[] = new Array(bands.length);
    const ready = closed ? [] : pool.filter(alive);
    const sent: Array<{ thread: Thread; index: number; seq: number }> = [];
    if (bands.length > 1 && ready.length > 0) {
      const raster = { width: images.raster.width, height: images.raster.height, data: scratch.hold(images.raster.data) };
      const mask = images.mask ? { width: images.mask.width, height: images.mask.height, excluded: scratch.hold(images.mask.excluded) } : null;
      for (let index = 1; index < bands.length && sent.length < ready.length; index++) {
        const thread = ready[sent.length]!;
        const task: RowBandTask = { seq: ++seq, pass, params, band: bands[index]!, raster, mask };
        Atomics.store(thread.signal, 0, 0);
        thread.worker.postMessage(task);
        sent.push({ thread, index, seq: task.seq });
      }
    }
    const remote = new Set(sent.map((s) => s.index));
    for (let index = 0; index < bands.length; index++) if (!remote.has(index)) results[index] = fn(images, params, bands[index]!);
    for (const s of sent) {
      const answer = waitFor(s.thread, s.seq);
      if (answer === null) results[s.index] = fn(images, params, bands[s.index]!); // the thread died: do its band here
      else if (answer.ok) results[s.index] = answer.result;
      else {
        const error = answer.name === 'RangeError' ? new RangeError(answer.message) : answer.name === 'TypeError' ? new TypeError(answer.message) : new Error(answer.message);
        throw error;
      }
    }
    return results as RowBandResult<N>[];
  }

  return {
    get bandCount() {
      return closed ? 1 : 1 + pool.filter(alive).length;
    },
    run,
    share(raster: Raster): Raster {
      return { width: raster.width, height: raster.height, data: inSharedMemory(raster.data) };
    },
    async ready() {
      await Promise.all(pool.map(booted));
    },
    liveThreads() {
      return closed ? 1 : 1 + pool.filter(alive).length;
    },
    async close() {
      closed = true;
      await Promise.all(pool.map((t) => t.worker.terminate()));
    },
  };
}

function startThread(): Thread {
  const signal = new Int32Array(new SharedArrayBuffer(8));
  const channel = new MessageChannel();
  const data: RowBandWorkerData & { port: MessagePort } = { signal, port: channel.port2 };
  const worker = new Worker(new URL('./row-band-worker-boot.js', import.meta.url), { workerData: data, transferList: [channel.port2] });
  const thread: Thread = { worker, port: channel.port1, signal, failed: false };
  worker.once('error', () => {
    thread.failed = true;
  });
  worker.once('exit', () => {
    thread.failed = true;
  });
  worker.unref();
  channel.port1.unref();
  return thread;
}

/** Resolves when the thread has booted or failed (polling its flag: the pool's threads never post to this thread's event loop). */
function booted(thread: Thread): Promise<void> {
  return new Promise<void>((resolve) => {
    const poll = setInterval(() => {
      if (Atomics.load(thread.signal, 1) === 1 || thread.failed || thread.worker.threadId === -1) {
        clearInterval(poll);
        resolve();
      }
    }, 5);
  });
}

/** The answer to task `seq`, or null when the thread died before answering. */
function waitFor(thread: Thread, seq: number): RowBandAnswer | null {
  for (;;) {
    const got = receiveMessageOnPort(thread.port);
    if (got) {
      const answer = got.message as RowBandAnswer;
      if (answer.seq === seq) return answer;
      continue; // a stale answer (from a run that gave up on this thread): skip it
    }
    if (thread.worker.threadId === -1) return null;
    // Returns at once when the answer flag is up (the message then shows on the port).
    Atomics.wait(thread.signal, 0, 0, 50);
  }
}

let processPool: RowBandPool | undefined;

/**
 * The process's own pool, started on first use and kept (its threads are unref'd,
 * so the process still exits when its work is done). For the CLI and other
 * surfaces that analyse one image after another.
 */
export function processRowBandPool(): RowBandPool {
  processPool ??= startRowBandPool();
  return processPool;
}
