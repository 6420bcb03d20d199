import { Worker } from 'node:worker_threads';
import { killClockProgram, newClockBuffer } from './plugin-clock.js';
import type { RolloutSpec } from './spec.js';
import type { FromWorker } from './worker-messages.js';
import type { CodeWorkerData } from './worker.js';

/** A code worker thread waiting for a run, with what it has said so far. */
export interface StartedWorker {
  readonly worker: Worker;
  readonly clock: SharedArrayBuffer;
  /** When the thread was started, or given back ready (performance.timeOrigin + performance.now(), ms). */
  readonly createdAt: number;
  /** Hands the thread to the pool: the handlers get the messages it sent so far, then the rest. */
  adopt(onMessage: (message: FromWorker) => void, onError: (error: Error) => void): void;
}

/**
 * Worker threads for a code environment, ready before a run needs them. Each thread loads
 * the definitions layer and the user's module itself (about 0.1 s of CPU, more on a busy
 * machine). Started early (count > 0), that happens while the calling thread prepares the
 * spec, instead of after it. Given back after a run (`giveBack`), a thread serves the next run
 * of the same spec without loading anything again: a comparison that runs each policy in
 * batches starts its threads once, not once a batch. The pool takes them (`take`); `close`
 * ends the ones it did not. While waiting they do not keep the process alive.
 */
export class EarlyWorkers {
  private readonly waiting: StartedWorker[] = [];
  private readonly factsAnswer: Promise<FactsAnswer> | null = null;

  /** With `facts`, the first thread also reports the environment's facts (see {@link facts}). */
  constructor(url: string, spec: RolloutSpec, count: number, options: { facts?: boolean } = {}) {
    for (let i = 0; i < count; i++) {
      const clock = newClockBuffer();
      const createdAt = performance.timeOrigin + performance.now();
      const facts = options.facts === true && i === 0;
      const worker = new Worker(url, { workerData: { spec, clock, facts } satisfies CodeWorkerData });
      this.wait(worker, clock, createdAt, []);
      if (facts) this.factsAnswer = answerOf(worker);
    }
  }

  /**
   * What the first thread said once it had built the spec: its facts, or the error that
   * stopped it. Null unless asked for at construction. While it is awaited the thread keeps
   * the process alive.
   */
  facts(): Promise<FactsAnswer> | null {
    return this.factsAnswer;
  }

  /** One waiting thread, or null when none is left. */
  take(): StartedWorker | null {
    return this.waiting.shift() ?? null;
  }

  /**
   * A thread whose run ended cleanly (no block in hand), back for the next run of the same
   * spec. `detach` removes the finished run's handlers; the next run is told the thread is ready.
   * A thread the run ended before it was ready (`stillStartingSince`, when it was started) is
   * not: its own ready message, still to come, reaches the next run with its true start-up.
   */
  giveBack(worker: Worker, clock: SharedArrayBuffer, detach: () => void, stillStartingSince: number | null = null): void {
    detach();
    if (stillStartingSince !== null) {
      this.wait(worker, clock, stillStartingSince, []);
      return;
    }
    const now = performance.timeOrigin + performance.now();
    this.wait(worker, clock, now, [{ type: 'ready', at: now, cpuSeconds: null }]);
  }

  /** Ends the threads nobody took, and the programs they started. */
  close(): void {
    for (const started of this.waiting.splice(0)) {
      void started.worker.terminate();
      killClockProgram(started.clock);
    }
  }

  private wait(worker: Worker, clock: SharedArrayBuffer, createdAt: number, said: FromWorker[]): void {
    worker.unref();
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

/** The first thread's answer to "build the spec and say what it is". */
export type FactsAnswer = Extract<FromWorker, { type: 'facts' } | { type: 'error' }>;

function answerOf(worker: Worker): Promise<FactsAnswer> {
  return new Promise<FactsAnswer>((resolve, reject) => {
    worker.ref();
    const settle = (done: () => void) => {
      worker.off('message', onMessage);
      worker.off('error', onError);
      worker.off('exit', onExit);
      worker.unref(); // the pool refs it again when it takes it
      done();
    };
    const onMessage = (message: FromWorker) => {
      if (message.type === 'facts' || message.type === 'error') settle(() => resolve(message));
    };
    const onError = (error: Error) => settle(() => reject(error));
    const onExit = (code: number) => settle(() => reject(new Error(`the thread building the environment ended (code ${code}) before it was ready`)));
    worker.on('message', onMessage);
    worker.on('error', onError);
    worker.on('exit', onExit);
  });
}
