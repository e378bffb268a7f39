/**
 * The workspace's handle on its analysis worker. Cancel terminates the worker (the
 * pipeline runs without pauses, so stopping the thread is the only true cancel) and
 * starts a fresh one; answers to older jobs are dropped.
 */
import type { FromWorker, ToWorker } from './analysis-protocol';

type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;

export type WorkerListener = (message: FromWorker) => void;

type Job = DistributiveOmit<ToWorker, 'jobId'>;

export class AnalysisClient {
  #worker: Worker;
  #jobId = 0;
  readonly #listener: WorkerListener;

  constructor(listener: WorkerListener) {
    this.#listener = listener;
    this.#worker = this.#spawn();
  }

  #spawn(): Worker {
    const worker = new Worker(new URL('./analysis-worker.ts', import.meta.url), { type: 'module', name: 'annula-analysis' });
    worker.onmessage = (event: MessageEvent<FromWorker>) => {
      const m = event.data;
      if (m.kind === 'ready' || m.jobId === this.#jobId) this.#listener(m);
    };
    worker.onerror = (event) => {
      event.preventDefault();
      this.#listener({ kind: 'error', jobId: this.#jobId, message: `the analysis worker stopped: ${event.message || 'unknown error'}`, reason: 'internal' });
    };
    return worker;
  }

  /** The id of the job sent now; earlier jobs' answers are ignored from here on. */
  send(job: Job): number {
    this.#jobId += 1;
    const message = { ...job, jobId: this.#jobId } as ToWorker;
    this.#worker.postMessage(message, message.kind === 'analyze' ? [message.bytes] : []);
    return this.#jobId;
  }

  /** Stops whatever runs; the new worker holds no image until the next analyze. */
  cancel(): void {
    this.#jobId += 1;
    this.#worker.terminate();
    this.#worker = this.#spawn();
  }

  dispose(): void {
    this.#worker.terminate();
  }
}
