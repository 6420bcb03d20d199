import { createHash } from 'node:crypto';
import { InputError } from '../errors.js';
import { machineFacts } from '../store/machine.js';
import type { Db } from '../store/open.js';
import { createRun, findRun, finishRun, type RunRecord } from '../store/runs.js';
import type { Annotations } from '../options/annotation-options.js';
import { compareStoredRuns, type RunsCompareOptions, type RunsComparison } from './runs-compare.js';

/** What a stored `runs compare` result keeps: its source runs and options, to be recomputed from them. */
export interface RunsCompareRecord extends RunsCompareOptions {
  /** The compared runs, in order. */
  readonly fromRuns: readonly string[];
  readonly policies: readonly string[];
  readonly paired: boolean;
}

/** True for a comparison run made by `runs compare --store-result` (no member runs of its own). */
export function isRunsCompareRecord(run: RunRecord): boolean {
  return run.kind === 'comparison' && Array.isArray((run.options as { fromRuns?: unknown }).fromRuns);
}

/**
 * Stores a comparison of stored runs as a comparison run: its episodes stay in the source
 * runs (nothing is copied), its summary is what `runs list` shows, and `runs show` recomputes
 * it from the source runs as long as they are kept.
 */
export function storeRunsComparison(db: Db, c: RunsComparison, options: RunsCompareOptions, toolVersion: string, annotations?: Annotations): string {
  const first = c.runs[0];
  const record: RunsCompareRecord = { ...options, fromRuns: c.runs.map((r) => r.id), policies: c.labels.policies, paired: c.paired };
  const id = createRun(db, {
    kind: 'comparison',
    env: first.env,
    policy: {
      label: c.labels.policies.join(' vs '),
      json: c.runs.map((r) => r.policy.json),
      baseDir: first.policy.baseDir,
      hash: createHash('sha256').update(c.runs.map((r) => r.policy.hash).join(',')).digest('hex'),
    },
    seed: first.seed,
    start: first.start,
    noise: first.noise,
    firstEpisode: first.firstEpisode,
    episodesRequested: Math.min(...c.runs.map((r) => r.episodesDone)),
    options: { ...record },
    facts: first.facts,
    toolVersion,
    machine: machineFacts(),
    files: c.runs.flatMap((r) => r.files ?? []),
    labels: annotations?.labels,
    note: annotations?.note,
  });
  finishRun(db, id, 'done', summaryOf(c));
  return id;
}

/** What `runs list` prints for it, as for a comparison run by `compare`. */
function summaryOf(c: RunsComparison): Record<string, unknown> {
  const pairs = c.comparison
    ? c.comparison.comparison.pairs.map((pair, q) => ({ a: pair.first, b: pair.second, mean: pair.meanDifference, half_width: c.comparison!.differenceIntervals[q].halfWidth }))
    : c.unpaired!.pairs.map((pair) => ({ a: pair.first, b: pair.second, mean: pair.welch.meanDifference, half_width: (pair.welch.high - pair.welch.low) / 2 }));
  return { episodes: c.comparison ? c.comparison.episodes : Math.min(...c.runs.map((r) => r.episodesDone)), target_reached: null, paired: c.paired, differences: pairs };
}

/** A stored `runs compare` result recomputed from its source runs. */
export function analyzeRunsComparisonRun(db: Db, run: RunRecord): RunsComparison {
  const record = run.options as unknown as RunsCompareRecord;
  const runs = record.fromRuns.map((id) => {
    const source = findRun(db, id);
    if (!source) throw new InputError(`run ${run.id}`, `compares run ${id}, which is no longer stored; its figures cannot be recomputed (delete this comparison with 'reckon runs delete ${run.id}')`);
    return source;
  });
  return compareStoredRuns(db, runs, record);
}

/**
 * Stored `runs compare` results that compare any of `ids` and are not among them: deleting
 * those runs leaves these results unable to recompute their figures, so `runs delete` names them.
 */
export function comparisonsDependingOn(db: Db, ids: readonly string[]): string[] {
  const going = new Set(ids);
  const rows = db.prepare("SELECT id, options_json FROM runs WHERE kind = 'comparison' AND options_json LIKE '%\"fromRuns\"%'").all() as { id: string; options_json: string }[];
  return rows
    .filter((row) => !going.has(row.id) && ((JSON.parse(row.options_json) as { fromRuns?: string[] }).fromRuns ?? []).some((id) => going.has(id)))
    .map((row) => row.id);
}
