/**
 * An off-policy evaluation run and kept: what `reckon offpolicy` and `POST /api/offpolicy`
 * both do, so a run stored from either reads back the same. The report's JSON is computed
 * once and becomes the stored run's summary.
 */
import { readDefinitionFile } from '../definitions/read-file.js';
import { offPolicyJson, type OffPolicyJson } from '../report/offpolicy-json.js';
import { definitionHash } from '../store/definition-hash.js';
import { machineFacts } from '../store/machine.js';
import { storeOffPolicyRun } from '../store/offpolicy-runs.js';
import type { Db } from '../store/open.js';
import type { Annotations } from '../options/annotation-options.js';
import { runOffPolicy, type OffPolicyRequest, type OffPolicyRun } from './run-offpolicy.js';

export interface StoredOffPolicy {
  readonly outcome: OffPolicyRun;
  readonly json: OffPolicyJson;
  /** Null when no store was given. */
  readonly runId: string | null;
}

/**
 * Runs the evaluation and, with a store, keeps it. `baseDir` is recorded as the definitions'
 * folder (a request's inline definitions name no files); by default the files' own.
 */
export async function runStoredOffPolicy(db: Db | null, request: OffPolicyRequest, meta: { toolVersion: string; baseDir?: string; annotations?: Annotations }): Promise<StoredOffPolicy> {
  const outcome = await runOffPolicy(request);
  const labels = {
    log: request.labels?.log ?? request.logPath,
    policy: request.labels?.policy ?? request.policyPath,
    env: request.envPath ? (request.labels?.env ?? request.envPath) : null,
    seed: request.seed,
  };
  const json = offPolicyJson(outcome, labels);
  if (!db) return { outcome, json, runId: null };
  const stored = (path: string, label: string) => {
    const file = readDefinitionFile(path, label);
    const baseDir = meta.baseDir ?? file.source.baseDir;
    return { label, json: file.json, baseDir, hash: definitionHash(file.json, baseDir) };
  };
  const runId = storeOffPolicyRun(db, {
    env: request.envPath ? stored(request.envPath, labels.env!) : null,
    policy: stored(request.policyPath, labels.policy),
    log: { label: labels.log, sha256: outcome.log.sha256, bytes: outcome.log.bytes, episodes: outcome.result.episodes, steps: outcome.result.steps },
    seed: request.seed,
    options: {
      behaviour: request.behaviourPath ? (request.labels?.behaviour ?? request.behaviourPath) : null,
      estimators: request.estimators,
      level: request.level,
      resamples: request.resamples,
      folds: request.folds,
    },
    toolVersion: meta.toolVersion,
    machine: machineFacts(),
    seconds: outcome.seconds,
    weights: outcome.result.diagnostics.weights,
    summary: json,
    labels: meta.annotations?.labels,
    note: meta.annotations?.note,
  });
  return { outcome, json, runId };
}
