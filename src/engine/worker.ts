/**
 * Worker-thread entry: prepares the spec it is given, then runs blocks of episodes on
 * request and sends the results back (buffers transferred, not copied).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { keepProcessConnections } from '../definitions/process-environment.js';
import { shareClock } from './plugin-clock.js';
import { prepareRollout } from './prepare.js';
import type { RolloutSpec } from './spec.js';
import { describeError, serveBlocks } from './worker-loop.js';

/** What the pool sends this worker: the spec, and the memory its plug-in clock lives in. */
export interface CodeWorkerData {
  readonly spec: RolloutSpec;
  readonly clock: SharedArrayBuffer;
}

const port = parentPort;
if (!port) throw new Error('worker.js must run as a worker thread');
const data = workerData as CodeWorkerData;
shareClock(data.clock);
keepProcessConnections(); // this thread runs the episodes: its process environment's program stays up

prepareRollout(data.spec).then(
  (prepared) => serveBlocks(port, prepared.runBlockAsync ?? ((block) => prepared.runBlock(block))),
  (e) => port.postMessage(describeError(e)),
);
