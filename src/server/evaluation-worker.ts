/**
 * A worker thread that carries out one evaluation or comparison for the server, exactly as
 * `reckon estimate` and `reckon compare` do (`runStoredEstimate`, `runStoredComparison`), so neither the definitions' compilation, the
 * episodes, nor the figures computed after them (a bootstrap can take seconds) run on the
 * thread that answers requests. Once the run exists in the store the thread reports its id
 * and blocks on a shared gate until the server's queue lets it go (or tells it to stop), so a
 * queued run already has the id the request was answered with.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { InputError, StoppedEarly } from '../errors.js';
import { runStoredComparison } from '../evaluate/stored-compare.js';
import { runStoredEstimate } from '../evaluate/stored-estimate.js';
import { openStore } from '../store/open.js';
import { GATE_STOP, GATE_WAIT, type EvaluationTask, type EvaluationWorkerData, type FromEvaluationWorker } from './evaluation-messages.js';

const data = workerData as EvaluationWorkerData;
const port = parentPort!;
const gate = new Int32Array(data.gate);
const controller = new AbortController();

function send(message: FromEvaluationWorker): void {
  port.postMessage(message);
}

/** Called between blocks too: a stop set on the gate while running ends the run as interrupted. */
function checkStop(): void {
  if (Atomics.load(gate, 0) === GATE_STOP) controller.abort();
}

/** Told the run's id once it exists: report it, then wait for the queue's word. */
function created(runId: string): void {
  send({ type: 'created', runId });
  Atomics.wait(gate, 0, GATE_WAIT);
  checkStop();
}

async function runTask(db: ReturnType<typeof openStore>, task: EvaluationTask): Promise<{ interrupted: boolean }> {
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
    { onRunId: created },
  );
  return result;
}

const db = openStore(data.storePath);
try {
  const result = await runTask(db, data.task);
  send({ type: 'end', status: result.interrupted ? 'interrupted' : 'done', error: null, input: null });
} catch (e) {
  // Stopped before two episodes: kept as interrupted (the store says so already), not failed.
  if (e instanceof StoppedEarly) send({ type: 'end', status: 'interrupted', error: null, input: null });
  else {
    const input = e instanceof InputError ? { where: e.where, detail: e.detail } : null;
    send({ type: 'end', status: 'failed', error: e instanceof Error ? e.message : String(e), input });
  }
} finally {
  db.close();
  port.close();
}
