import type { FromWorker } from './worker-messages.js';

/**
 * Where one thread's share of a run went. A pool that scales keeps every worker busy from
 * its start-up to the end of the run; idle time means the pool kept a thread waiting, and
 * queued time means the machine had no free core for it. Reported by runEpisodes for
 * benchmarks and diagnosis; no figure of a run depends on it.
 */
export interface ThreadTiming {
  /** `caller`: blocks run on the thread that called runEpisodes; `worker`: a worker thread. */
  readonly thread: 'caller' | 'worker';
  /** Seconds from the thread's start until it could run episodes (Node, the engine, the definitions, the user's module); 0 for the caller. */
  readonly startupSeconds: number;
  /** The thread's CPU seconds during that start-up, where the system tells (else null). */
  readonly startupCpuSeconds: number | null;
  /** Seconds after the run began that the thread was ready (negative when started ahead of the run). */
  readonly readyAt: number;
  /** Seconds after the run began that its last block ended (the run's end for a thread with none). */
  readonly doneAt: number;
  readonly blocks: number;
  readonly episodes: number;
  readonly steps: number;
  /** Seconds spent running blocks. */
  readonly busySeconds: number;
  /** Seconds between ready and its last block with no block to run. */
  readonly idleSeconds: number;
  /** CPU seconds of the thread from its start to its last block (start-up included); null where unknown. */
  readonly cpuSeconds: number | null;
  /** Seconds the thread was runnable but waited for a core; null where unknown. */
  readonly queuedSeconds: number | null;
}

/** Collects one thread's timings from its messages (or, for the caller, from its own blocks). */
export class ThreadTimingRecorder {
  private startupSeconds = 0;
  private startupCpuSeconds: number | null = null;
  private readyAt: number | null = null;
  private doneAt: number | null = null;
  private blocks = 0;
  private episodes = 0;
  private steps = 0;
  private busySeconds = 0;
  private idleSeconds = 0;
  private cpuSeconds: number | null = null;
  private queuedSeconds: number | null = null;

  /** `runStart`: the run's start on the shared clock (performance.timeOrigin + performance.now(), ms). */
  constructor(
    readonly thread: 'caller' | 'worker',
    private readonly runStart: number,
  ) {
    if (thread === 'caller') this.readyAt = 0;
  }

  /** The thread's first message; `createdAt`: when its Worker was constructed, on the shared clock. */
  ready(message: Extract<FromWorker, { type: 'ready' }>, createdAt: number): void {
    const at = message.at ?? this.now();
    this.startupSeconds = Math.max(0, at - createdAt) / 1000;
    this.startupCpuSeconds = message.cpuSeconds ?? null;
    this.readyAt = (at - this.runStart) / 1000;
  }

  block(message: Extract<FromWorker, { type: 'block' }>): void {
    this.blocks++;
    this.episodes += message.count;
    this.steps += message.steps;
    this.busySeconds += message.busySeconds ?? 0;
    // A thread kept from an earlier run waited between the runs: only this run's waits count.
    const blockStart = (message.at ?? this.now()) - (message.busySeconds ?? 0) * 1000;
    this.idleSeconds += Math.min(message.idleSeconds ?? 0, Math.max(0, (blockStart - this.runStart) / 1000));
    this.cpuSeconds = message.cpuSeconds ?? null;
    this.queuedSeconds = message.queuedSeconds ?? null;
    this.doneAt = ((message.at ?? this.now()) - this.runStart) / 1000;
  }

  /** A block this (calling) thread ran itself, from `start` to `end` on the shared clock. */
  ranBlock(count: number, steps: number, start: number, end: number, previousEnd: number): void {
    this.blocks++;
    this.episodes += count;
    this.steps += steps;
    this.busySeconds += (end - start) / 1000;
    this.idleSeconds += Math.max(0, start - previousEnd) / 1000;
    this.doneAt = (end - this.runStart) / 1000;
  }

  /** The caller thread's own CPU and queue figures over the run (the events it handled included). */
  callerTimes(cpuSeconds: number | null, queuedSeconds: number | null): void {
    this.cpuSeconds = cpuSeconds;
    this.queuedSeconds = queuedSeconds;
  }

  result(runEnd: number): ThreadTiming {
    const end = (runEnd - this.runStart) / 1000;
    return {
      thread: this.thread,
      startupSeconds: this.startupSeconds,
      startupCpuSeconds: this.startupCpuSeconds,
      readyAt: this.readyAt ?? end,
      doneAt: this.doneAt ?? end,
      blocks: this.blocks,
      episodes: this.episodes,
      steps: this.steps,
      busySeconds: this.busySeconds,
      idleSeconds: this.idleSeconds,
      cpuSeconds: this.cpuSeconds,
      queuedSeconds: this.queuedSeconds,
    };
  }

  private now(): number {
    return performance.timeOrigin + performance.now();
  }
}
