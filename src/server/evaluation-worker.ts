/**
 * A worker thread that carries out evaluations and comparisons for the server, one after
 * another, exactly as `reckon estimate` and `reckon compare` do (`runStoredEstimate`,
 * `runStoredComparison`), so neither the definitions' compilation, the episodes, nor the
 * figures computed after them (a bootstrap can take seconds) run on the thread that answers
 * requests. The thread is kept between tasks (evaluation-threads.ts): it loads the evaluation
 * code and opens the store once, not per run. Once a task's run exists in the store the thread
 * reports its id and blocks on the task's gate until the server's queue lets it go (or tells
 * it to stop), so a queued run already has the id the request was answered with.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { InputError, StoppedEarly } from '../errors.js';
import { runStoredComparison } from '../evaluate/stored-compare.js';
import { runStoredEstimate } from '../evaluate/stored-estimate.js';
import { openStore } from '../store/open.js';
import { GATE_STOP, GATE_WAIT, type EvaluationTask, type EvaluationWorkerData, type FromEvaluationWorker, type ToEvaluationWorker } from './evaluation-messages.js';

const data = workerData as EvaluationWorkerData;
const port = parentPort!;

function send(message: FromEvaluationWorker): void {
  port.postMessage(message);
}

async function runTask(db: ReturnType<typeof openStore>, task: EvaluationTask, gate: Int32Array): Promise<{ interrupted: boolean }> {
  const controller = new AbortController();
  /** Called between blocks too: a stop set on the gate while running ends the run as interrupted. */
  const checkStop = () => {
    if (Atomics.load(gate, 0) === GATE_STOP) controller.abort();
  };
  /** Told the run's id once it exists: report it, then wait for the queue's word. */
  const created = (runId: string) => {
    send({ type: 'created', runId });
    Atomics.wait(gate, 0, GATE_WAIT);
    checkStop();
  };
  if (task.kind === 'estimate') {
    const { result } = await runStoredEstimate({
      db,
      spec: task.spec,
      options: task.options,
      toolVersion: data.toolVersion,
      shard: null,
      first: 0,
      signal: controller.signal,
      onRunId: created,
      annotations: task.annotations,
      onProgress: (p) => {
        checkStop();
        send({ type: 'progress', progress: { done: p.done, total: p.total, seconds: p.seconds, mean: p.mean, halfWidth: p.halfWidth } });
      },
    });
    return result;
  }
  const { result } = await runStoredComparison(
    db,
    {
      ...task.request,
      signal: controller.signal,
      onProgress: (p) => {
        checkStop();
        send({ type: 'progress', progress: { done: p.done, total: p.total, seconds: p.seconds, mean: Number.NaN, halfWidth: p.halfWidth } });
      },
    },
    data.toolVersion,
    { onRunId: created, annotations: task.annotations },
  );
  return result;
}

const db = openStore(data.storePath);
// The server hands this thread a task only when the last one has ended, so they never overlap.
port.on('message', (message: ToEvaluationWorker) => {
  if (message.type === 'close') {
    db.close();
    port.close();
    return;
  }
  runTask(db, message.task, new Int32Array(message.gate)).then(
    (result) => send({ type: 'end', status: result.interrupted ? 'interrupted' : 'done', error: null, input: null }),
    (e: unknown) => {
      // Stopped before two episodes: kept as interrupted (the store says so already), not failed.
      if (e instanceof StoppedEarly) {
        send({ type: 'end', status: 'interrupted', error: null, input: null });
        return;
      }
      const input = e instanceof InputError ? { where: e.where, detail: e.detail } : null;
      send({ type: 'end', status: 'failed', error: e instanceof Error ? e.message : String(e), input });
    },
  );
});
