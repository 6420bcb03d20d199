import type { MessagePort } from 'node:worker_threads';
import { BlockMemory, type EpisodeBlock } from './episode-block.js';
import { DEFAULT_STEP_TIMEOUT_SECONDS } from './step-watch.js';
import { threadTimes } from './thread-times.js';
import type { FromWorker, ToWorker } from './worker-messages.js';

/** A thrown value as the error message the pool turns back into an error (keeping InputError's parts). */
export function describeError(e: unknown): FromWorker {
  const err = e as { name?: string; message?: string; where?: string; detail?: string };
  return { type: 'error', name: err?.name ?? 'Error', message: err?.message ?? String(e), where: err?.where, detail: err?.detail };
}

/** Milliseconds on the clock every thread of the process shares. */
function wallClock(): number {
  return performance.timeOrigin + performance.now();
}

/**
 * The message loop every worker entry runs once it can roll out: announce readiness, then run
 * each requested block and send its results back with their buffers transferred, not copied.
 * Each message carries the thread's timings (start-up, busy and idle time, its own CPU), so
 * the pool can tell where a run's time went.
 */
export function serveBlocks(
  port: MessagePort,
  runBlock: (block: EpisodeBlock, stepTimeout: number) => number | Promise<number>,
  options: { overlap?: boolean } = {},
): void {
  const send = (message: FromWorker, transfer: ArrayBuffer[] = []) => port.postMessage(message, transfer);
  let lastEnd = wallClock();
  const memory = new BlockMemory();
  /** Starts a block (calls runBlock) and returns what finishing it needs. */
  const start = (message: Extract<ToWorker, { type: 'run' }>) => {
    const block = memory.take(message.first, message.count);
    const at = wallClock();
    let steps: Promise<number>;
    try {
      steps = Promise.resolve(runBlock(block, message.stepTimeout ?? DEFAULT_STEP_TIMEOUT_SECONDS));
    } catch (e) {
      steps = Promise.reject(e);
    }
    steps.catch(() => {}); // read in finish(); this only keeps an early failure from counting as unhandled
    return { block, at, steps };
  };
  const finish = async (started: ReturnType<typeof start>) => {
    try {
      const { block } = started;
      const steps = await started.steps;
      const end = wallClock();
      // A block started early (overlap) was busy from when the one before it ended.
      const begin = Math.max(started.at, lastEnd);
      const times = threadTimes();
      send(
        {
          type: 'block',
          first: block.first,
          count: block.count,
          returns: block.returns,
          lengths: block.lengths,
          finals: block.finals,
          steps,
          at: end,
          busySeconds: (end - begin) / 1000,
          idleSeconds: Math.max(0, begin - lastEnd) / 1000,
          cpuSeconds: times?.cpuSeconds ?? null,
          queuedSeconds: times?.queuedSeconds ?? null,
        },
        [block.returns.buffer as ArrayBuffer, block.lengths.buffer as ArrayBuffer, block.finals.buffer as ArrayBuffer],
      );
      lastEnd = wallClock();
    } catch (e) {
      send(describeError(e));
    }
  };
  // Blocks run one after another, in the order asked, and are answered in that order. With
  // `overlap` (a process environment's episode path) each is started as soon as it is asked
  // for, so its request reaches the program while the one before it is still running.
  let queue: Promise<void> = Promise.resolve();
  port.on('message', (message: ToWorker) => {
    if (message.type === 'stop') {
      port.close();
      return;
    }
    if (message.spare) memory.giveBack(message.spare);
    if (options.overlap) {
      const started = start(message);
      queue = queue.then(() => finish(started));
    } else {
      queue = queue.then(() => finish(start(message)));
    }
  });
  lastEnd = wallClock();
  send({ type: 'ready', at: lastEnd, cpuSeconds: threadTimes()?.cpuSeconds ?? null });
}
