/**
 * Worker-thread entry that builds a spec whose definitions run user code (a module's top
 * level and factory) and sends back what a report says about the environment. The calling
 * thread waits for it without running that code itself, so Ctrl-C still works when the code
 * never returns.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { warnFromThisThread } from '../definitions/deprecation.js';
import { prepareRollout } from '../engine/prepare.js';
import type { RolloutSpec } from '../engine/spec.js';
import { describeError } from '../engine/worker-loop.js';
import { environmentFacts } from './environment-facts.js';

const port = parentPort;
if (!port) throw new Error('facts-worker.js must run as a worker thread');
warnFromThisThread();

prepareRollout(workerData as RolloutSpec).then(
  (prepared) => port.postMessage({ type: 'facts', facts: environmentFacts(prepared.env, prepared.policy, prepared.startIndex) }),
  (e) => port.postMessage(describeError(e)),
);
