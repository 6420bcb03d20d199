import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { EvaluationWorkerData, ToEvaluationWorker } from './evaluation-messages.js';

function workerUrl(): string {
  const here = fileURLToPath(import.meta.url);
  // Under the test runner this file is TypeScript source; the worker always runs the build.
  if (here.endsWith('.ts')) return path.resolve(path.dirname(here), '../../dist/server/evaluation-worker.js');
  return path.join(path.dirname(here), 'evaluation-worker.js');
}

/**
 * The server's evaluation threads, kept warm between runs. Starting one costs a few hundred
 * milliseconds of CPU (Node, the evaluation code and its libraries, the store), as much as the
 * whole sampling of a run of some 10⁵ short episodes, and the request that starts a run waits
 * for it; a thread that finished its run is kept for the next one instead. At most `keep`
 * idle threads are kept (the number of runs the server runs at once); idle ones do not keep
 * the process alive.
 */
export class EvaluationThreads {
  private readonly idle: Worker[] = [];
  private readonly all = new Set<Worker>();
  private closed = false;
  /** Threads started so far (reused ones are not counted again). */
  started = 0;

  constructor(
    private readonly data: EvaluationWorkerData,
    private readonly keep: number,
  ) {}

  /** An idle thread, or a new one. The caller gives it back with `give` once its task has ended. */
  take(): Worker {
    const reused = this.idle.pop();
    if (reused) {
      reused.ref();
      return reused;
    }
    const worker = new Worker(workerUrl(), { workerData: this.data });
    this.started++;
    this.all.add(worker);
    worker.on('exit', () => {
      this.all.delete(worker);
      const at = this.idle.indexOf(worker);
      if (at >= 0) this.idle.splice(at, 1);
    });
    // A thread that fails between tasks only leaves the pool (its exit above); a task's own listeners report failures during a run.
    worker.on('error', () => {});
    return worker;
  }

  /** A thread whose task has ended: kept for the next task, or ended when enough are idle. */
  give(worker: Worker): void {
    if (!this.all.has(worker)) return;
    if (this.closed || this.idle.length >= this.keep) {
      this.end(worker);
      return;
    }
    worker.unref();
    this.idle.push(worker);
  }

  /** Ends the idle threads; threads still running a task end when it is given back. */
  async close(): Promise<void> {
    this.closed = true;
    await Promise.all(this.idle.splice(0).map((w) => this.end(w)));
  }

  /** Asks the thread to close its store and end; ends it outright if it has not within 2 s. */
  private end(worker: Worker): Promise<void> {
    return new Promise<void>((resolve) => {
      const timer = setTimeout(() => void worker.terminate(), 2000);
      worker.once('exit', () => {
        clearTimeout(timer);
        resolve();
      });
      worker.postMessage({ type: 'close' } satisfies ToEvaluationWorker);
    });
  }
}
