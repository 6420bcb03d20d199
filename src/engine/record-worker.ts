/**
 * Worker-thread entry of `estimate --record` for a run with user code (a module environment
 * or policy): prepares the spec (so a
 * behaviour policy without probabilities is refused before the run starts), says `ready`, and
 * on `write` replays the run's episodes into the log (record-module.ts), then says `done`.
 * Plug-in code runs here, never on the thread that answers signals.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { InputError } from '../errors.js';
import { keepProcessConnections } from '../definitions/process-start.js';
import { shareClock } from './plugin-clock.js';
import { DEFAULT_STEP_TIMEOUT_SECONDS } from './step-watch.js';
import { prepareRollout } from './prepare.js';
import { recordModuleEpisodes } from './record-module.js';
import { recordFiniteEpisodes } from './record-finite.js';
import type { RolloutSpec } from './spec.js';
import { describeError } from './worker-loop.js';

export interface RecordWorkerData {
  readonly spec: RolloutSpec;
  readonly clock: SharedArrayBuffer;
  readonly path: string;
}

export type ToRecordWorker = { type: 'write'; first: number; count: number; description: string; stepTimeout?: number };

const port = parentPort;
if (!port) throw new Error('record-worker.js must run as a worker thread');
const data = workerData as RecordWorkerData;
shareClock(data.clock);
keepProcessConnections(); // a process environment's program records the episodes, so it stays up

prepareRollout(data.spec).then(
  (prepared) => {
    const { env, policy } = prepared;
    if (policy.kind !== 'code') throw new Error('record-worker.js records runs with user code only');
    if (env.kind === 'module' && env.process) {
      const record = prepared.recordProcess;
      if (!record) throw new InputError('--record', `needs the behaviour policy's probabilities: ${prepared.recordRefusal ?? 'they are unknown'}`);
      port.on('message', (message: ToRecordWorker) => {
        record(data.path, message.first, message.count, message.description, message.stepTimeout ?? DEFAULT_STEP_TIMEOUT_SECONDS).then(
          () => port.postMessage({ type: 'done' }),
          (e) => port.postMessage(describeError(e)),
        );
      });
      port.postMessage({ type: 'ready' });
      return;
    }
    if (env.kind === 'module' ? !policy.probabilitiesAt : !policy.matrix) {
      throw new InputError('--record', `needs the behaviour policy's probabilities: ${data.spec.policy.source.label} is a code policy without probabilities(state)`);
    }
    const { seed, start } = data.spec;
    port.on('message', (message: ToRecordWorker) => {
      try {
        const range = { first: message.first, count: message.count, description: message.description };
        if (env.kind === 'module') recordModuleEpisodes(data.path, { env, policy, seed, startName: start, ...range });
        else recordFiniteEpisodes(data.path, { mdp: env.mdp, policy, seed, start: prepared.startIndex, ...range });
        port.postMessage({ type: 'done' });
      } catch (e) {
        port.postMessage(describeError(e));
      }
    });
    port.postMessage({ type: 'ready' });
  },
).catch((e) => port.postMessage(describeError(e)));
