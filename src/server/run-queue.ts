import { EventEmitter } from 'node:events';

/** Progress of a running job, as the engine reports it between blocks. */
export interface JobProgress {
  readonly done: number;
  readonly total: number;
  readonly seconds: number;
  readonly mean: number;
  readonly halfWidth: number;
}

export type JobEvent =
  | { readonly type: 'started' }
  | { readonly type: 'progress'; readonly progress: JobProgress }
  | { readonly type: 'end'; readonly status: string; readonly error: string | null };

export interface QueueJob {
  readonly id: string;
  /** Runs the job to its end; `report` passes progress on to listeners. Must not throw. */
  run(signal: AbortSignal, report: (progress: JobProgress) => void): Promise<{ status: string; error: string | null }>;
  /** Called instead of `run` when the queue closes before the job started. */
  cancel(): void;
}

export type JobState =
  | { readonly state: 'queued'; readonly position: number }
  | { readonly state: 'running'; readonly progress: JobProgress | null };

interface Running {
  readonly job: QueueJob;
  readonly controller: AbortController;
  progress: JobProgress | null;
  readonly finished: Promise<void>;
}

/**
 * A bounded queue of runs: at most `concurrency` run at once and at most `capacity` wait, so a
 * burst of submissions is refused (HTTP 429) instead of growing memory or starving the
 * machine. Listeners follow one job's progress (server-sent events).
 */
export class RunQueue {
  private readonly waiting: QueueJob[] = [];
  private readonly running = new Map<string, Running>();
  private readonly events = new EventEmitter();
  private closed = false;
  /** Requests admitted but whose job is still being prepared (they hold a place). */
  private reserved = 0;

  constructor(
    readonly concurrency: number,
    readonly capacity: number,
  ) {
    this.events.setMaxListeners(0);
  }

  /** True when a new job would be accepted now. */
  hasRoom(): boolean {
    return !this.closed && this.running.size + this.waiting.length + this.reserved < this.concurrency + this.capacity;
  }

  /**
   * Holds a place for a job still being prepared (its run is being created), so concurrent
   * requests cannot overfill the queue; null when full. `add` fills the place, `release` frees it.
   */
  reserve(): { add(job: QueueJob): void; release(): void } | null {
    if (!this.hasRoom()) return null;
    this.reserved++;
    let used = false;
    const free = () => {
      if (used) return false;
      used = true;
      this.reserved--;
      return true;
    };
    return {
      add: (job) => {
        if (!free()) return;
        if (this.closed) {
          job.cancel();
          return;
        }
        this.waiting.push(job);
        this.startWaiting();
      },
      release: () => void free(),
    };
  }

  state(id: string): JobState | null {
    const running = this.running.get(id);
    if (running) return { state: 'running', progress: running.progress };
    const position = this.waiting.findIndex((j) => j.id === id);
    return position >= 0 ? { state: 'queued', position: position + 1 } : null;
  }

  /** Follows a job's events until it ends; returns the unsubscribe function. */
  follow(id: string, listener: (event: JobEvent) => void): () => void {
    this.events.on(id, listener);
    return () => this.events.off(id, listener);
  }

  get size(): { running: number; waiting: number } {
    return { running: this.running.size, waiting: this.waiting.length };
  }

  /**
   * Stops one job: a running one is asked to stop (it ends interrupted, its finished episodes
   * kept), a waiting one is dropped. False when this queue does not hold the job.
   */
  stop(id: string): boolean {
    const running = this.running.get(id);
    if (running) {
      running.controller.abort();
      return true;
    }
    const position = this.waiting.findIndex((j) => j.id === id);
    if (position < 0) return false;
    const [job] = this.waiting.splice(position, 1);
    job.cancel();
    this.events.emit(job.id, { type: 'end', status: 'interrupted', error: null } satisfies JobEvent);
    return true;
  }

  /** Stops taking jobs, drops the waiting ones, and asks the running ones to stop; resolves when they have. */
  async close(): Promise<void> {
    this.closed = true;
    for (const job of this.waiting.splice(0)) {
      job.cancel();
      this.events.emit(job.id, { type: 'end', status: 'interrupted', error: null } satisfies JobEvent);
    }
    for (const r of this.running.values()) r.controller.abort();
    await Promise.all([...this.running.values()].map((r) => r.finished));
  }

  private startWaiting(): void {
    while (!this.closed && this.running.size < this.concurrency && this.waiting.length > 0) {
      const job = this.waiting.shift()!;
      const controller = new AbortController();
      const entry: Running = {
        job,
        controller,
        progress: null,
        finished: Promise.resolve()
          .then(() => {
            this.events.emit(job.id, { type: 'started' } satisfies JobEvent);
            return job.run(controller.signal, (progress) => {
              entry.progress = progress;
              this.events.emit(job.id, { type: 'progress', progress } satisfies JobEvent);
            });
          })
          .catch((e: unknown) => ({ status: 'failed', error: e instanceof Error ? e.message : String(e) }))
          .then((outcome) => {
            this.running.delete(job.id);
            this.events.emit(job.id, { type: 'end', status: outcome.status, error: outcome.error } satisfies JobEvent);
            this.startWaiting();
          }),
      };
      this.running.set(job.id, entry);
    }
  }
}
