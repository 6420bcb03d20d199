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
export function serveBlocks(port: MessagePort, runBlock: (block: EpisodeBlock, stepTimeout: number) => number | Promise<number>): void {
  const send = (message: FromWorker, transfer: ArrayBuffer[] = []) => port.postMessage(message, transfer);
  let lastEnd = wallClock();
  const memory = new BlockMemory();
  const run = async (message: Extract<ToWorker, { type: 'run' }>) => {
    try {
      const block = memory.take(message.first, message.count);
      const start = wallClock();
      const steps = await runBlock(block, message.stepTimeout ?? DEFAULT_STEP_TIMEOUT_SECONDS);
      const end = wallClock();
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
          busySeconds: (end - start) / 1000,
          idleSeconds: Math.max(0, start - lastEnd) / 1000,
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
  // Blocks that wait on a program (process environments) run one after another, in the order asked.
  let queue: Promise<void> = Promise.resolve();
  port.on('message', (message: ToWorker) => {
    if (message.type === 'stop') {
      port.close();
      return;
    }
    if (message.spare) memory.giveBack(message.spare);
    queue = queue.then(() => run(message));
  });
  lastEnd = wallClock();
  send({ type: 'ready', at: lastEnd, cpuSeconds: threadTimes()?.cpuSeconds ?? null });
}
