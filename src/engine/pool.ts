import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { InputError } from '../errors.js';
import { newBlock, type EpisodeBlock } from './episode-block.js';
import { prepareRollout } from './prepare.js';
import type { RolloutSpec } from './spec.js';
import type { FromWorker } from './worker-messages.js';

export interface RunOptions {
  /** First episode index (a resumed or sharded run starts later). */
  readonly first: number;
  readonly count: number;
  /** Worker threads; 1 runs in this thread. */
  readonly workers: number;
  /** Called with every block, in episode order, exactly once each. */
  readonly onBlock: (block: EpisodeBlock, steps: number) => void;
  /** Stops issuing new blocks; blocks already running still finish and are delivered in order. */
  readonly signal?: AbortSignal;
  /** Wall-clock seconds a block should take (sets its size; never affects results). */
  readonly blockSeconds?: number;
}

export interface RunOutcome {
  readonly episodes: number;
  readonly steps: number;
  readonly seconds: number;
}

export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

/**
 * Runs episodes [first, first + count) of a spec on `workers` threads. Blocks are handed out
 * on demand and delivered in episode order, so what the caller sees (and every figure it
 * computes) is the same whatever the number of workers or the block sizes.
 */
export async function runEpisodes(spec: RolloutSpec, options: RunOptions): Promise<RunOutcome> {
  const workers = Math.max(1, Math.min(options.workers, Math.ceil(options.count / 64) || 1));
  return workers === 1 ? runInline(spec, options) : runThreaded(spec, options, workers);
}

/** Chooses block sizes so a block takes about `target` seconds, within [16, 65536] episodes. */
class BlockSizer {
  size = 32;
  constructor(private readonly target: number) {}
  observe(count: number, seconds: number): void {
    if (seconds <= 0) {
      this.size = Math.min(65536, this.size * 4);
      return;
    }
    const ideal = (count / seconds) * this.target;
    this.size = Math.max(16, Math.min(65536, Math.round(Math.min(ideal, this.size * 4))));
  }
}

async function runInline(spec: RolloutSpec, options: RunOptions): Promise<RunOutcome> {
  const prepared = await prepareRollout(spec);
  const started = performance.now();
  const sizer = new BlockSizer(options.blockSeconds ?? 0.1);
  const end = options.first + options.count;
  let next = options.first;
  let steps = 0;
  while (next < end && !options.signal?.aborted) {
    const count = Math.min(sizer.size, end - next);
    const block = newBlock(next, count);
    const t0 = performance.now();
    const blockSteps = prepared.runBlock(block);
    sizer.observe(count, (performance.now() - t0) / 1000);
    steps += blockSteps;
    next += count;
    options.onBlock(block, blockSteps);
    // Let signals, timers and progress output through between blocks.
    await new Promise<void>((resolve) => setImmediate(resolve));
  }
  return { episodes: next - options.first, steps, seconds: (performance.now() - started) / 1000 };
}

function workerUrl(): string {
  const here = fileURLToPath(import.meta.url);
  // Under the test runner this file is TypeScript source; workers always run the compiled build.
  if (here.endsWith('.ts')) return path.resolve(path.dirname(here), '../../dist/engine/worker.js');
  return path.join(path.dirname(here), 'worker.js');
}

function rebuildError(message: Extract<FromWorker, { type: 'error' }>): Error {
  if ((message.name === 'InputError' || message.name === 'NotFoundError') && message.detail !== undefined) {
    return new InputError(message.where ?? '', message.detail);
  }
  const error = new Error(message.message);
  error.name = message.name;
  return error;
}

function runThreaded(spec: RolloutSpec, options: RunOptions, workerCount: number): Promise<RunOutcome> {
  return new Promise<RunOutcome>((resolve, reject) => {
    const started = performance.now();
    const end = options.first + options.count;
    const sizer = new BlockSizer(options.blockSeconds ?? 0.1);
    const pending = new Map<number, { block: EpisodeBlock; steps: number }>();
    const threads: Worker[] = [];
    const issuedAt = new Map<Worker, number>();
    let next = options.first;
    let delivered = options.first;
    let steps = 0;
    let running = 0;
    let failed = false;

    const finishIfDone = () => {
      if (running > 0) return;
      if (next < end && !options.signal?.aborted && !failed) return;
      for (const t of threads) void t.terminate();
      if (!failed) resolve({ episodes: delivered - options.first, steps, seconds: (performance.now() - started) / 1000 });
    };

    const fail = (error: Error) => {
      if (failed) return;
      failed = true;
      for (const t of threads) void t.terminate();
      reject(error);
    };

    const issue = (worker: Worker) => {
      if (failed || options.signal?.aborted || next >= end) {
        finishIfDone();
        return;
      }
      const count = Math.min(sizer.size, end - next);
      issuedAt.set(worker, performance.now());
      worker.postMessage({ type: 'run', first: next, count });
      next += count;
      running++;
    };

    const deliver = () => {
      for (let item = pending.get(delivered); item; item = pending.get(delivered)) {
        pending.delete(delivered);
        delivered += item.block.count;
        steps += item.steps;
        options.onBlock(item.block, item.steps);
      }
    };

    for (let w = 0; w < workerCount; w++) {
      const worker = new Worker(workerUrl(), { workerData: spec });
      threads.push(worker);
      worker.on('message', (message: FromWorker) => {
        if (message.type === 'ready') {
          issue(worker);
        } else if (message.type === 'block') {
          running--;
          const t0 = issuedAt.get(worker) ?? performance.now();
          sizer.observe(message.count, (performance.now() - t0) / 1000);
          const block: EpisodeBlock = { first: message.first, count: message.count, returns: message.returns, lengths: message.lengths };
          pending.set(message.first, { block, steps: message.steps });
          try {
            deliver();
          } catch (e) {
            fail(e as Error);
            return;
          }
          issue(worker);
        } else {
          fail(rebuildError(message));
        }
      });
      worker.on('error', (e) => fail(e));
    }
    options.signal?.addEventListener('abort', () => finishIfDone());
  });
}
