import { InputError } from '../errors.js';
import type { Db } from './open.js';
import { appendChunk, createRun, finishRun, listRunsForMerge, loadEpisodes, type RunRecord } from './runs.js';

export interface MergeSource {
  readonly label: string;
  readonly db: Db;
}

/** The fields every shard of one run shares, with the words used when they differ. */
const SAME_FIELDS: readonly [string, (r: RunRecord) => unknown][] = [
  ['environment (content hash)', (r) => r.env.hash],
  ['policy (content hash)', (r) => r.policy.hash],
  ['seed', (r) => r.seed],
  ['shard count M', (r) => r.shard?.count],
  ['total episodes', (r) => r.shard?.total],
  ['start state', (r) => r.start],
  ['noise mode', (r) => r.noise],
];

/**
 * Joins the shards of one seeded run (`estimate --shard K/M` on several machines) into one run
 * whose episodes, and so every figure, equal those of the unsharded run. Refuses shards of
 * different runs, naming the field that differs, and incomplete sets, naming what is missing.
 */
export function mergeShards(sources: readonly MergeSource[], into: Db, describe: (run: RunRecord) => Record<string, unknown>): { runId: string; parts: RunRecord[] } {
  const found: { run: RunRecord; source: MergeSource }[] = [];
  for (const source of sources) {
    for (const run of listRunsForMerge(source.db)) found.push({ run, source });
  }
  if (found.length === 0) {
    throw new InputError('runs merge', `no finished shard runs in ${sources.map((s) => s.label).join(', ')}; shards come from 'reckon estimate --shard K/M'`);
  }
  for (const [field, get] of SAME_FIELDS) {
    const values = new Map<string, string>();
    for (const { run, source } of found) values.set(JSON.stringify(get(run) ?? null), `${run.id} in ${source.label}`);
    if (values.size > 1) {
      const examples = [...values.entries()].slice(0, 2).map(([v, where]) => `${v} (${where})`).join(' vs ');
      throw new InputError('runs merge', `the shard runs differ in their ${field}: ${examples}; merge the shards of one run at a time`);
    }
  }
  const count = found[0].run.shard!.count;
  const byIndex = new Map<number, { run: RunRecord; source: MergeSource }>();
  for (const item of found) if (!byIndex.has(item.run.shard!.index)) byIndex.set(item.run.shard!.index, item);
  const missing = Array.from({ length: count }, (_, i) => i + 1).filter((k) => !byIndex.has(k));
  if (missing.length > 0) {
    throw new InputError('runs merge', `shard${missing.length > 1 ? 's' : ''} ${missing.join(', ')} of ${count} ${missing.length > 1 ? 'are' : 'is'} missing (or not finished); run them with --shard K/${count} and merge again`);
  }
  const parts = Array.from({ length: count }, (_, i) => byIndex.get(i + 1)!);
  const first = parts[0].run;
  const total = first.shard!.total;
  const runId = createRun(into, {
    kind: 'estimate',
    env: first.env,
    policy: first.policy,
    seed: first.seed,
    start: first.start,
    noise: first.noise,
    firstEpisode: 0,
    episodesRequested: total,
    options: { ...first.options, episodes: total },
    facts: first.facts,
    toolVersion: first.toolVersion,
    files: first.files ?? [],
    machine: { merged_from: parts.map(({ run, source }) => ({ run: run.id, store: source.label, machine: run.machine })) },
  });
  let seconds = 0;
  try {
    for (const { run, source } of parts) {
      const episodes = loadEpisodes(source.db, run);
      seconds += run.seconds;
      appendChunk(into, runId, { first: run.firstEpisode, returns: episodes.returns, lengths: episodes.lengths, finals: episodes.finals }, run.steps, seconds);
    }
  } catch (e) {
    finishRun(into, runId, 'failed', null, (e as Error).message);
    throw e;
  }
  const merged = listRunsForMerge(into, runId)[0];
  finishRun(into, runId, 'done', describe(merged));
  return { runId, parts: parts.map((p) => p.run) };
}
