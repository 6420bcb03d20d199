/**
 * A worker thread that carries out one evaluation for the server, exactly as
 * `reckon estimate` does (`runStoredEstimate`), so neither the definitions' compilation, the
 * episodes, nor the figures computed after them (a bootstrap can take seconds) run on the
 * thread that answers requests. Once the run exists in the store the thread reports its id
 * and blocks on a shared gate until the server's queue lets it go (or tells it to stop), so a
 * queued run already has the id the request was answered with.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { InputError } from '../errors.js';
import { runStoredEstimate } from '../evaluate/stored-estimate.js';
import { openStore } from '../store/open.js';
import { GATE_STOP, GATE_WAIT, type EvaluationWorkerData, type FromEvaluationWorker } from './evaluation-messages.js';

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

const db = openStore(data.storePath);
try {
  const { result } = await runStoredEstimate({
    db,
    spec: data.spec,
    options: data.options,
    toolVersion: data.toolVersion,
    shard: null,
    first: 0,
    signal: controller.signal,
    onRunId: (runId) => {
      send({ type: 'created', runId });
      Atomics.wait(gate, 0, GATE_WAIT);
      checkStop();
    },
    onProgress: (p) => {
      checkStop();
      send({ type: 'progress', progress: { done: p.done, total: p.total, seconds: p.seconds, mean: p.mean, halfWidth: p.halfWidth } });
    },
  });
  send({ type: 'end', status: result.interrupted ? 'interrupted' : 'done', error: null, input: null });
} catch (e) {
  const input = e instanceof InputError ? { where: e.where, detail: e.detail } : null;
  send({ type: 'end', status: 'failed', error: e instanceof Error ? e.message : String(e), input });
} finally {
  db.close();
  port.close();
}
