import { Worker } from 'node:worker_threads';
import { newClockBuffer } from './plugin-clock.js';
import type { RolloutSpec } from './spec.js';
import type { FromWorker } from './worker-messages.js';
import type { CodeWorkerData } from './worker.js';

/** A code worker thread started ahead of its run, with what it has said so far. */
export interface StartedWorker {
  readonly worker: Worker;
  readonly clock: SharedArrayBuffer;
  /** When the thread was started (performance.timeOrigin + performance.now(), ms). */
  readonly createdAt: number;
  /** Hands the thread to the pool: the handlers get the messages it sent so far, then the rest. */
  adopt(onMessage: (message: FromWorker) => void, onError: (error: Error) => void): void;
}

/**
 * Worker threads for a code environment, started before the calling thread prepares the spec.
 * Each thread loads the definitions layer and the user's module itself (a few hundred
 * milliseconds on a busy machine); started early, that happens while this thread does the
 * same, instead of after it. The pool takes them (`take`); `close` ends the ones it did not.
 * Until taken they do not keep the process alive.
 */
export class EarlyWorkers {
  private readonly waiting: StartedWorker[] = [];

  constructor(url: string, spec: RolloutSpec, count: number) {
    for (let i = 0; i < count; i++) {
      const clock = newClockBuffer();
      const createdAt = performance.timeOrigin + performance.now();
      const worker = new Worker(url, { workerData: { spec, clock } satisfies CodeWorkerData });
      worker.unref();
      const said: FromWorker[] = [];
      let failed: Error | null = null;
      const keep = (message: FromWorker) => said.push(message);
      const remember = (error: Error) => (failed ??= error);
      worker.on('message', keep);
      worker.on('error', remember);
      this.waiting.push({
        worker,
        clock,
        createdAt,
        adopt(onMessage, onError) {
          worker.off('message', keep);
          worker.off('error', remember);
          worker.ref();
          worker.on('message', onMessage);
          worker.on('error', onError);
          for (const message of said) onMessage(message);
          if (failed) onError(failed);
        },
      });
    }
  }

  /** One started thread, or null when none is left. */
  take(): StartedWorker | null {
    return this.waiting.shift() ?? null;
  }

  /** Ends the threads nobody took. */
  close(): void {
    for (const started of this.waiting.splice(0)) void started.worker.terminate();
  }
}
