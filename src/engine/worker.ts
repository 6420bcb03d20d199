/**
 * Worker-thread entry: prepares the spec it is given, then runs blocks of episodes on
 * request and sends the results back (buffers transferred, not copied).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { prepareRollout } from './prepare.js';
import type { RolloutSpec } from './spec.js';
import { describeError, serveBlocks } from './worker-loop.js';

const port = parentPort;
if (!port) throw new Error('worker.js must run as a worker thread');

prepareRollout(workerData as RolloutSpec).then(
  (prepared) => serveBlocks(port, (block) => prepared.runBlock(block)),
  (e) => port.postMessage(describeError(e)),
);
