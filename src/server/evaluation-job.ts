import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { InputError } from '../errors.js';
import type { Db } from '../store/open.js';
import { findRun, finishRun } from '../store/runs.js';
import { GATE_GO, GATE_STOP, type EvaluationTask, type EvaluationWorkerData, type FromEvaluationWorker } from './evaluation-messages.js';
import type { JobProgress, QueueJob } from './run-queue.js';

function workerUrl(): string {
  const here = fileURLToPath(import.meta.url);
  // Under the test runner this file is TypeScript source; the worker always runs the build.
  if (here.endsWith('.ts')) return path.resolve(path.dirname(here), '../../dist/server/evaluation-worker.js');
  return path.join(path.dirname(here), 'evaluation-worker.js');
}

type Outcome = { status: string; error: string | null };

/**
 * Starts an evaluation's thread and resolves once its run exists in the store (the id to
 * answer with) with a queue job that lets it go; a bad request rejects with the InputError the
 * command line would print. Until the job runs, the thread waits without using the CPU.
 */
export function prepareEvaluation(db: Db, storePath: string, task: EvaluationTask, toolVersion: string): Promise<QueueJob> {
  const gate = new SharedArrayBuffer(4);
  const flag = new Int32Array(gate);
  const data: EvaluationWorkerData = { storePath, task, toolVersion, gate };
  const worker = new Worker(workerUrl(), { workerData: data });
  let report: ((p: JobProgress) => void) | null = null;
  let runId: string | null = null;
  let outcome: Outcome | null = null;
  let settle: ((o: Outcome) => void) | null = null;
  const finished = new Promise<Outcome>((resolve) => (settle = resolve));
  const release = (value: number) => {
    Atomics.store(flag, 0, value);
    Atomics.notify(flag, 0);
  };

  return new Promise<QueueJob>((resolveJob, rejectJob) => {
    worker.on('message', (message: FromEvaluationWorker) => {
      if (message.type === 'created') {
        runId = message.runId;
        const id = message.runId;
        resolveJob({
          id,
          run: (signal, onProgress) => {
            report = onProgress;
            signal.addEventListener('abort', () => release(GATE_STOP), { once: true });
            release(GATE_GO);
            return finished;
          },
          cancel: () => release(GATE_STOP),
        });
      } else if (message.type === 'progress') {
        report?.(message.progress);
      } else {
        outcome = { status: message.status, error: message.error };
        if (runId === null) {
          rejectJob(message.input ? new InputError(message.input.where, message.input.detail) : new Error(message.error ?? 'the evaluation failed'));
        }
      }
    });
    worker.on('error', (e) => {
      outcome ??= { status: 'failed', error: e.message };
      if (runId === null) rejectJob(e);
    });
    worker.on('exit', () => {
      const final = outcome ?? { status: 'failed', error: 'the evaluation thread stopped unexpectedly' };
      if (runId === null) rejectJob(new Error(final.error ?? 'the evaluation thread stopped'));
      else if (final.status === 'failed' && findRun(db, runId)?.status === 'running') finishRun(db, runId, 'failed', null, final.error);
      // (A comparison's member runs are marked by runStoredComparison itself when it fails.)
      settle!(final);
    });
  });
}
