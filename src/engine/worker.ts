/**
 * Worker-thread entry: prepares the spec it is given, then runs blocks of episodes on
 * request and sends the results back (buffers transferred, not copied).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { newBlock } from './episode-block.js';
import { prepareRollout } from './prepare.js';
import type { RolloutSpec } from './spec.js';
import type { FromWorker, ToWorker } from './worker-messages.js';

const port = parentPort;
if (!port) throw new Error('worker.js must run as a worker thread');

function send(message: FromWorker, transfer: ArrayBuffer[] = []): void {
  port!.postMessage(message, transfer);
}

function describe(e: unknown): FromWorker {
  const err = e as { name?: string; message?: string; where?: string; detail?: string; episode?: number; step?: number; plugin?: string };
  return { type: 'error', name: err?.name ?? 'Error', message: err?.message ?? String(e), where: err?.where, detail: err?.detail };
}

prepareRollout(workerData as RolloutSpec).then(
  (prepared) => {
    send({ type: 'ready' });
    port.on('message', (message: ToWorker) => {
      if (message.type === 'stop') {
        port.close();
        return;
      }
      try {
        const block = newBlock(message.first, message.count);
        const steps = prepared.runBlock(block);
        send(
          { type: 'block', first: block.first, count: block.count, returns: block.returns, lengths: block.lengths, steps },
          [block.returns.buffer as ArrayBuffer, block.lengths.buffer as ArrayBuffer],
        );
      } catch (e) {
        send(describe(e));
      }
    });
  },
  (e) => send(describe(e)),
);
