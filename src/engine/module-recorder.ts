/**
 * The main thread's side of recording a code environment's episodes: a worker thread
 * (record-worker.ts) prepares the spec at once, so a policy without probabilities is refused
 * before the run, then replays the episodes into the log when asked. Its plug-in clock is
 * watched as the pool watches its workers, so a call that hangs fails with the episode and step.
 */
import { Worker } from 'node:worker_threads';
import { newClockBuffer } from './plugin-clock.js';
import { rebuildError, workerUrl } from './pool.js';
import type { RecordWorkerData } from './record-worker.js';
import type { RolloutSpec } from './spec.js';
import { DEFAULT_STEP_TIMEOUT_SECONDS, StepWatch, watchInterval } from './step-watch.js';

/** Seconds past --step-timeout before this watch fails a process environment's recording (its connection times it out first). */
const PROCESS_WATCH_GRACE_SECONDS = 3;
import type { FromWorker } from './worker-messages.js';

type Answer = { type: 'ready' } | { type: 'done' } | Extract<FromWorker, { type: 'error' }>;

export class ModuleRecorder {
  private readonly worker: Worker;
  private readonly watch: StepWatch;
  private busy = false;
  private waiting: { resolve: () => void; reject: (e: Error) => void } | null = null;
  private failure: Error | null = null;

  private readonly process: boolean;

  private constructor(spec: RolloutSpec, path: string, private readonly stepTimeout: number) {
    this.process = (spec.env.json as { kind?: unknown } | null)?.kind === 'process';
    const clock = newClockBuffer();
    this.watch = new StepWatch(clock, () => this.busy);
    this.worker = new Worker(workerUrl('record-worker.js'), { workerData: { spec, clock, path } satisfies RecordWorkerData });
    this.worker.on('message', (message: Answer) => (message.type === 'error' ? this.fail(rebuildError(message)) : this.settle()));
    this.worker.on('error', (e) => this.fail(e));
  }

  /** Starts the worker and waits until it has prepared the spec (or refused it). */
  static async start(spec: RolloutSpec, path: string, stepTimeout = DEFAULT_STEP_TIMEOUT_SECONDS): Promise<ModuleRecorder> {
    const recorder = new ModuleRecorder(spec, path, stepTimeout);
    try {
      await recorder.answer();
    } catch (e) {
      await recorder.close();
      throw e;
    }
    return recorder;
  }

  /** Writes episodes first .. first + count − 1 of the seeded run; `description` goes into the header. */
  async write(first: number, count: number, description: string): Promise<void> {
    this.busy = true;
    // A process environment's program is timed out by its connection, which asks it where it
    // hung; this watch then only backs that up.
    const watchTimeout = this.stepTimeout + (this.process ? PROCESS_WATCH_GRACE_SECONDS : 0);
    const timer = setInterval(() => {
      const hang = this.watch.check(performance.now(), watchTimeout);
      if (hang) this.fail(hang);
    }, watchInterval(watchTimeout));
    try {
      const done = this.answer();
      this.worker.postMessage({ type: 'write', first, count, description, stepTimeout: this.stepTimeout });
      await done;
    } finally {
      clearInterval(timer);
      this.busy = false;
    }
  }

  async close(): Promise<void> {
    await this.worker.terminate();
  }

  private answer(): Promise<void> {
    if (this.failure) return Promise.reject(this.failure);
    return new Promise((resolve, reject) => (this.waiting = { resolve, reject }));
  }

  private settle(): void {
    const waiting = this.waiting;
    this.waiting = null;
    waiting?.resolve();
  }

  private fail(e: Error): void {
    this.failure ??= e;
    const waiting = this.waiting;
    this.waiting = null;
    waiting?.reject(e);
  }
}
