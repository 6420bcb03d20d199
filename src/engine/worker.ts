/**
 * Worker-thread entry: prepares the spec it is given, then runs blocks of episodes on
 * request and sends the results back (buffers transferred, not copied). A process
 * environment's program is started before anything heavy is loaded, so that Python starts
 * while this thread loads the definitions layer; the first worker of a run may also be asked
 * for the environment's facts, which it learns from what it built (no thread builds a module,
 * nor starts a program, just to describe the environment).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { warnFromThisThread } from '../definitions/deprecation.js';
import { keepProcessConnections, startProgramEarly } from '../definitions/process-start.js';
import { CLOCK_PID, pluginClock, shareClock } from './plugin-clock.js';
import type { RolloutSpec } from './spec.js';
import { describeError, serveBlocks } from './worker-loop.js';

/** What the pool sends this worker: the spec, and the memory its plug-in clock lives in. */
export interface CodeWorkerData {
  readonly spec: RolloutSpec;
  readonly clock: SharedArrayBuffer;
  /** Post the environment's facts ({ type: 'facts' }) once prepared, before 'ready'. */
  readonly facts?: boolean;
}

const port = parentPort;
if (!port) throw new Error('worker.js must run as a worker thread');
const data = workerData as CodeWorkerData;
shareClock(data.clock);
// The thread that describes the environment is the one that says what in its definitions is deprecated.
if (data.facts) warnFromThisThread();
keepProcessConnections(); // this thread runs the episodes: its process environment's program stays up
const program = startProgramEarly(data.spec.env.json, data.spec.env.source);
if (program) pluginClock()[CLOCK_PID] = program.pid; // so a thread ended before it is ready still ends its program

try {
  const { prepareRollout } = await import('./prepare.js');
  const prepared = await prepareRollout(data.spec);
  if (data.facts) {
    const { environmentFacts } = await import('../evaluate/environment-facts.js');
    port.postMessage({ type: 'facts', facts: environmentFacts(prepared.env, prepared.policy, prepared.startIndex) });
  }
  serveBlocks(port, prepared.runBlockAsync ?? ((block) => prepared.runBlock(block)), { overlap: prepared.overlapBlocks === true });
} catch (e) {
  port.postMessage(describeError(e));
}
