import { Worker } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import type { EarlyWorkers, FactsAnswer } from '../engine/early-workers.js';
import { rebuildError } from '../engine/pool.js';
import { prepareOnCallingThread, prepareRollout, type PreparedRollout } from '../engine/prepare.js';
import { runsOnCallingThread, runsPluginCode } from '../engine/runs-plugin-code.js';
import type { RolloutSpec } from '../engine/spec.js';
import type { FromWorker } from '../engine/worker-messages.js';
import { StoppedEarly } from '../errors.js';
import { environmentFacts, type EnvironmentFacts } from './environment-facts.js';

/** A spec ready to run: prepared in this thread (null when it runs user code), and its facts. */
export interface ReadyRun {
  readonly prepared: PreparedRollout | null;
  readonly facts: EnvironmentFacts;
}

/**
 * Builds a spec and learns its facts before any episode. A spec without user code is built
 * here, once, and handed to the pool; so is a process environment whose policy runs no user
 * JavaScript (runsOnCallingThread): its program then runs the episodes for this thread. One that loads a module is built on a worker thread
 * (facts-worker.ts), which this thread only waits for, so a module whose top level or
 * factory never returns can still be stopped: the signal ends the thread and the wait
 * throws StoppedEarly (`creating`). The pool's own threads build it again for the episodes,
 * except where the run's first thread was started early to report the facts itself
 * (`early`, as an estimate starts them): then nothing is built twice.
 */
export async function prepareForRun(spec: RolloutSpec, signal?: AbortSignal, early?: EarlyWorkers | null): Promise<ReadyRun> {
  if (!runsPluginCode(spec) || runsOnCallingThread(spec)) {
    const prepared = runsPluginCode(spec) ? await prepareOnCallingThread(spec, signal) : await prepareRollout(spec);
    return { prepared, facts: environmentFacts(prepared.env, prepared.policy, prepared.startIndex) };
  }
  const answer = early?.facts();
  if (answer) return { prepared: null, facts: await factsFromRunThread(answer, signal) };
  return { prepared: null, facts: await factsOffThread(spec, signal) };
}

/**
 * The facts the run's first worker thread reports once it has built the spec (a process
 * environment's, learnt from the program that then runs its episodes). The thread is the
 * caller's to end (EarlyWorkers.close), on a stop too.
 */
function factsFromRunThread(answer: Promise<FactsAnswer>, signal?: AbortSignal): Promise<EnvironmentFacts> {
  if (signal?.aborted) return Promise.reject(new StoppedEarly(0, 0, true));
  return new Promise<EnvironmentFacts>((resolve, reject) => {
    const onAbort = () => reject(new StoppedEarly(0, 0, true));
    signal?.addEventListener('abort', onAbort, { once: true });
    answer.then(
      (message) => {
        signal?.removeEventListener('abort', onAbort);
        if (message.type === 'facts') resolve(message.facts);
        else reject(rebuildError(message));
      },
      (e) => {
        signal?.removeEventListener('abort', onAbort);
        reject(e);
      },
    );
  });
}

function factsOffThread(spec: RolloutSpec, signal?: AbortSignal): Promise<EnvironmentFacts> {
  if (signal?.aborted) return Promise.reject(new StoppedEarly(0, 0, true));
  const worker = new Worker(workerFile('facts-worker.js'), { workerData: spec });
  return new Promise<EnvironmentFacts>((resolve, reject) => {
    const finish = (settle: () => void) => {
      signal?.removeEventListener('abort', onAbort);
      void worker.terminate();
      settle();
    };
    const onAbort = () => finish(() => reject(new StoppedEarly(0, 0, true)));
    signal?.addEventListener('abort', onAbort);
    worker.on('message', (message: FromWorker | { type: 'facts'; facts: EnvironmentFacts }) => {
      if (message.type === 'facts') finish(() => resolve(message.facts));
      else if (message.type === 'error') finish(() => reject(rebuildError(message)));
    });
    worker.on('error', (e) => finish(() => reject(e)));
    worker.on('exit', (code) => finish(() => reject(new Error(`the thread building ${spec.env.source.label} ended (code ${code}) before it was ready`))));
  });
}

function workerFile(file: string): string {
  const here = fileURLToPath(import.meta.url);
  // Under the test runner this file is TypeScript source; workers always run the compiled build.
  if (here.endsWith('.ts')) return path.resolve(path.dirname(here), '../../dist/evaluate', file);
  return path.join(path.dirname(here), file);
}
