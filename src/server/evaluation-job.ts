import { InputError } from '../errors.js';
import type { Db } from '../store/open.js';
import { findRun, finishRun } from '../store/runs.js';
import { GATE_GO, GATE_STOP, type EvaluationTask, type FromEvaluationWorker, type ToEvaluationWorker } from './evaluation-messages.js';
import type { EvaluationThreads } from './evaluation-threads.js';
import type { JobProgress, QueueJob } from './run-queue.js';

type Outcome = { status: string; error: string | null };

/**
 * Hands an evaluation to a thread (a warm one when there is one) and resolves once its run
 * exists in the store (the id to answer with) with a queue job that lets it go; a bad request
 * rejects with the InputError the command line would print. Until the job runs, the thread
 * waits without using the CPU. When the task ends the thread goes back to `threads`.
 */
export function prepareEvaluation(db: Db, threads: EvaluationThreads, task: EvaluationTask): Promise<QueueJob> {
  const gate = new SharedArrayBuffer(4);
  const flag = new Int32Array(gate);
  const worker = threads.take();
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
    /** The task is over (ended, or its thread died): mark a failed run, answer whoever waits, free the thread. */
    const conclude = (final: Outcome, threadAlive: boolean) => {
      worker.off('message', onMessage);
      worker.off('error', onError);
      worker.off('exit', onExit);
      if (runId === null) rejectJob(new Error(final.error ?? 'the evaluation thread stopped'));
      else if (final.status === 'failed' && findRun(db, runId)?.status === 'running') finishRun(db, runId, 'failed', null, final.error);
      // (A comparison's member runs are marked by runStoredComparison itself when it fails.)
      if (threadAlive) threads.give(worker);
      settle!(final);
    };
    const onMessage = (message: FromEvaluationWorker) => {
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
        if (runId === null && message.input) rejectJob(new InputError(message.input.where, message.input.detail));
        conclude(outcome, true);
      }
    };
    const onError = (e: Error) => {
      outcome ??= { status: 'failed', error: e.message };
      if (runId === null) rejectJob(e);
    };
    const onExit = () => conclude(outcome ?? { status: 'failed', error: 'the evaluation thread stopped unexpectedly' }, false);
    worker.on('message', onMessage);
    worker.on('error', onError);
    worker.on('exit', onExit);
    worker.postMessage({ type: 'task', task, gate } satisfies ToEvaluationWorker);
  });
}
