import type { EnvironmentFacts } from '../evaluate/environment-facts.js';
import type { EstimateResult } from '../evaluate/estimate.js';
import { estimateJson } from '../report/estimate-json.js';
import type { RunRecord } from '../store/runs.js';
import type { ComparisonResult } from '../evaluate/compare.js';
import { compareJson } from './compare-json.js';
import { withSnakeCaseKeys } from './snake-case.js';
import { provenanceJson } from './provenance.js';

/**
 * A row of `GET /api/runs`: the fields of `reckon runs list --json`. A comparison lists its
 * member runs' ids; a member names its comparison in `parent_id`.
 */
export function runListRow(r: RunRecord, members: readonly RunRecord[] | null = null) {
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
    noise: r.noise,
    // A comparison keeps its episodes in its member runs; its summary counts them.
    episodes: r.kind === 'comparison' ? Number((r.summary as { episodes?: number } | null)?.episodes ?? 0) : r.episodesDone,
    episodes_requested: r.episodesRequested,
    shard: r.shard,
    // Summaries were first stored with camelCase interval keys: both spellings are given.
    summary: withSnakeCaseKeys(r.summary),
    ci_method: intervalMethod(r),
    parent_id: r.parentId,
    ...annotationsJson(r),
    ...(r.kind === 'comparison' && members ? { members: members.map((m) => m.id) } : {}),
  };
}

/** The interval method a run reports with (as chosen, or as stored in its summary). */
export function intervalMethod(r: RunRecord): string | null {
  const summary = r.summary as { ci?: { method?: string } } | null;
  if (summary?.ci?.method) return summary.ci.method;
  const options = r.options as { method?: string | null; sequence?: string | null };
  return options.sequence ?? options.method ?? null;
}

/**
 * `GET /api/runs/:id`: the object `reckon runs show --json` prints (the estimate's keys plus
 * the run's provenance). test/server/api.test.ts checks the two agree key for key.
 */
/** Where a run came from and where it stands: the keys every run object adds to its figures. */
export function runProvenanceJson(run: RunRecord, members: readonly RunRecord[] = []) {
  return provenance(run, members);
}

function provenance(run: RunRecord, members: readonly RunRecord[] = []) {
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
    ...annotationsJson(run),
    ...provenanceJson(run, members),
  };
}

/**
 * A run's labels (an object keyed by the user's own label keys) and notes, oldest first:
 * part of every run object reckon writes.
 */
export function annotationsJson(run: Pick<RunRecord, 'labels' | 'notes'>) {
  return {
    labels: { ...run.labels },
    notes: run.notes.map((n) => ({ added_at: n.addedAt, text: n.text })),
  };
}

/**
 * What `runs show ID --json` and `GET /api/comparisons/:id` print for a comparison: the
 * `compare --json` object, each policy with its member run's id, the ids in `members`, and
 * the run's provenance.
 */
export function comparisonShowJson(run: RunRecord, result: ComparisonResult, labels: { env: string; policies: string[] }, members: readonly RunRecord[]) {
  return {
    ...compareJson(result, labels, run.toolVersion, run.id, members.map((m) => m.id)),
    kind: 'comparison' as const,
    members: members.map((m) => m.id),
    ...provenance(run, members),
  };
}

export function runShowJson(run: RunRecord, result: EstimateResult) {
  return {
    ...estimateJson(result, { env: run.env.label, policy: run.policy.label }, run.toolVersion, run.id),
    ...provenance(run),
    terminals: terminalsJson(result.facts),
  };
}

/**
 * The names `terminal=X` events of a run can use (the review page offers them): each cell
 * letter once with its number of cells, or each tabular state; null for module environments
 * and runs stored before terminals were recorded.
 */
function terminalsJson(facts: EnvironmentFacts): { name: string; states: number }[] | null {
  if (!facts.terminals) return null;
  const byName = new Map<string, number>();
  for (const t of facts.terminals) byName.set(t.cell ?? t.state, (byName.get(t.cell ?? t.state) ?? 0) + 1);
  return [...byName.entries()].map(([name, states]) => ({ name, states }));
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
    noise: run.noise,
    ...provenance(run),
  };
}
