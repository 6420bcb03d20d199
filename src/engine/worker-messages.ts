import type { EnvironmentFacts } from '../evaluate/environment-facts.js';

/** Messages between the pool and its worker threads. */
import type { SpareBlock } from './episode-block.js';

/** `stepTimeout`: seconds a process environment's program may stay silent (the pool's --step-timeout). */
/** `spare`: the memory of a block already read, transferred back for the worker to fill again. */
export type ToWorker = { type: 'run'; first: number; count: number; stepTimeout?: number; spare?: SpareBlock } | { type: 'stop' };

/**
 * What a worker thread says. The timing fields feed the pool's per-thread timings
 * (thread-timing.ts); they are optional, so an entry that leaves them out still works.
 * Times are on the shared wall clock (`performance.timeOrigin + performance.now()`, in
 * milliseconds); CPU and queue figures are the thread's own since it started (thread-times.ts).
 */
export type FromWorker =
  | { type: 'ready'; at?: number; cpuSeconds?: number | null }
  | {
      type: 'block';
      first: number;
      count: number;
      returns: Float64Array;
      lengths: Uint32Array;
      finals: Int32Array;
      steps: number;
      /** When the block ended, and how long it ran. */
      at?: number;
      busySeconds?: number;
      /** Seconds the thread had nothing to run before this block. */
      idleSeconds?: number;
      cpuSeconds?: number | null;
      queuedSeconds?: number | null;
    }
  | { type: 'error'; name: string; message: string; where?: string; detail?: string }
  /** The environment's facts, from a worker asked for them (CodeWorkerData.facts), before 'ready'. */
  | { type: 'facts'; facts: EnvironmentFacts };
