import type { MessagePort } from 'node:worker_threads';
import { newBlock, type EpisodeBlock } from './episode-block.js';
import type { FromWorker, ToWorker } from './worker-messages.js';

/** A thrown value as the error message the pool turns back into an error (keeping InputError's parts). */
export function describeError(e: unknown): FromWorker {
  const err = e as { name?: string; message?: string; where?: string; detail?: string };
  return { type: 'error', name: err?.name ?? 'Error', message: err?.message ?? String(e), where: err?.where, detail: err?.detail };
}

/**
 * The message loop every worker entry runs once it can roll out: announce readiness, then run
 * each requested block and send its results back with their buffers transferred, not copied.
 */
export function serveBlocks(port: MessagePort, runBlock: (block: EpisodeBlock) => number): void {
  const send = (message: FromWorker, transfer: ArrayBuffer[] = []) => port.postMessage(message, transfer);
  port.on('message', (message: ToWorker) => {
    if (message.type === 'stop') {
      port.close();
      return;
    }
    try {
      const block = newBlock(message.first, message.count);
      const steps = runBlock(block);
      send(
        { type: 'block', first: block.first, count: block.count, returns: block.returns, lengths: block.lengths, finals: block.finals, steps },
        [block.returns.buffer as ArrayBuffer, block.lengths.buffer as ArrayBuffer, block.finals.buffer as ArrayBuffer],
      );
    } catch (e) {
      send(describeError(e));
    }
  });
  send({ type: 'ready' });
}
