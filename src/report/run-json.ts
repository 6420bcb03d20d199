import type { EstimateResult } from '../evaluate/estimate.js';
import { estimateJson } from '../report/estimate-json.js';
import type { RunRecord } from '../store/runs.js';

/** A row of `GET /api/runs`: the fields of `reckon runs list --json`. */
export function runListRow(r: RunRecord) {
  return {
    id: r.id,
    kind: r.kind,
    status: r.status,
    created_at: r.createdAt,
    env: r.env.label,
    env_hash: r.env.hash,
    policy: r.policy.label,
    policy_hash: r.policy.hash,
    seed: r.seed,
    // A comparison keeps its episodes in its member runs; its summary counts them.
    episodes: r.kind === 'comparison' ? Number((r.summary as { episodes?: number } | null)?.episodes ?? 0) : r.episodesDone,
    episodes_requested: r.episodesRequested,
    shard: r.shard,
    summary: r.summary,
  };
}

/**
 * `GET /api/runs/:id`: the object `reckon runs show --json` prints (the estimate's keys plus
 * the run's provenance). test/server/api.test.ts checks the two agree key for key.
 */
/** Where a run came from and where it stands: the keys every run object adds to its figures. */
function provenance(run: RunRecord) {
  return {
    status: run.status,
    created_at: run.createdAt,
    finished_at: run.finishedAt,
    env_hash: run.env.hash,
    policy_hash: run.policy.hash,
    shard: run.shard,
    episodes_requested: run.episodesRequested,
    tool_version: run.toolVersion,
    machine: run.machine,
    /** Why a failed run failed (null otherwise). */
    error: run.error,
  };
}

export function runShowJson(run: RunRecord, result: EstimateResult) {
  return {
    ...estimateJson(result, { env: run.env.label, policy: run.policy.label }, run.toolVersion, run.id),
    ...provenance(run),
  };
}

/** What can be said of a run with fewer than two episodes stored (queued, or just started). */
export function runPendingJson(run: RunRecord) {
  return {
    run_id: run.id,
    env: run.env.label,
    policy: run.policy.label,
    episodes: run.episodesDone,
    seed: run.seed,
    start: run.start,
    ...provenance(run),
  };
}
