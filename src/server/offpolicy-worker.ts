/**
 * A worker thread that carries out one off-policy evaluation for the server exactly as
 * `reckon offpolicy` does (`runStoredOffPolicy`): the request's log and definitions are
 * written to a private temporary folder (the readers stream files), evaluated, stored, and
 * the folder removed. Reading a large log and its bootstraps take seconds, never on the
 * thread that answers requests.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { parentPort, workerData } from 'node:worker_threads';
import { InputError } from '../errors.js';
import { runStoredOffPolicy } from '../offpolicy/stored-offpolicy.js';
import { openStore } from '../store/open.js';
import type { OffPolicyTask } from './offpolicy-request.js';

export interface OffPolicyWorkerData {
  readonly storePath: string;
  readonly baseDir: string;
  readonly toolVersion: string;
  readonly task: OffPolicyTask;
}

export type FromOffPolicyWorker =
  | { readonly type: 'done'; readonly runId: string; readonly json: Record<string, unknown> }
  | { readonly type: 'failed'; readonly error: string; readonly input: { readonly where: string; readonly detail: string } | null };

const data = workerData as OffPolicyWorkerData;
const port = parentPort!;
const { task } = data;
const folder = mkdtempSync(path.join(tmpdir(), 'reckon-offpolicy-'));
const file = (name: string, content: unknown) => {
  const at = path.join(folder, name);
  writeFileSync(at, typeof content === 'string' ? content : JSON.stringify(content));
  return at;
};
const db = openStore(data.storePath);
try {
  const stored = await runStoredOffPolicy(
    db,
    {
      logPath: file('log.jsonl', task.log),
      policyPath: file('policy.json', task.policy),
      envPath: task.env === null ? null : file('env.json', task.env),
      behaviourPath: task.behaviour === null ? null : file('behaviour.json', task.behaviour),
      labels: task.labels,
      estimators: task.estimators,
      level: task.level,
      seed: task.seed,
      resamples: task.resamples,
      folds: task.folds,
    },
    { toolVersion: data.toolVersion, baseDir: data.baseDir, annotations: task.annotations },
  );
  port.postMessage({ type: 'done', runId: stored.runId!, json: { ...stored.json, run_id: stored.runId } } satisfies FromOffPolicyWorker);
} catch (e) {
  const input = e instanceof InputError ? { where: e.where, detail: e.detail } : null;
  port.postMessage({ type: 'failed', error: e instanceof Error ? e.message : String(e), input } satisfies FromOffPolicyWorker);
} finally {
  db.close();
  rmSync(folder, { recursive: true, force: true });
  port.close();
}
