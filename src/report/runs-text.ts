import type { RunRecord } from '../store/runs.js';
import { columns, count, decimalsFor, fixed } from './format.js';

function shortTime(iso: string): string {
  return iso.replace('T', ' ').slice(0, 16);
}

function clip(text: string, width: number): string {
  return text.length <= width ? text : `…${text.slice(text.length - width + 1)}`;
}

function clipEnd(text: string, width: number): string {
  return text.length <= width ? text : `${text.slice(0, width - 1)}…`;
}

/** The interval method a run's figures use, short enough for a column. */
function methodOf(run: RunRecord): string {
  const summary = run.summary as { ci?: { method?: string } } | null;
  const options = run.options as { method?: string | null; sequence?: string | null };
  return summary?.ci?.method ?? options.sequence ?? options.method ?? '';
}

function rowOf(run: RunRecord, id: string): string[] {
  const summary = run.summary as {
    mean?: number;
    ci?: { halfWidth?: number; half_width?: number; level?: number; method?: string };
    differences?: { a: number; b: number; mean: number; half_width: number }[];
  } | null;
  let estimate = '';
  const halfWidth = summary?.ci?.half_width ?? summary?.ci?.halfWidth;
  if (run.kind === 'offpolicy') {
    estimate = offPolicyEstimate(run.summary);
  } else if (run.kind === 'comparison' && summary?.differences?.length) {
    const first = summary.differences[0];
    const d = decimalsFor(first.half_width);
    const more = summary.differences.length > 1 ? ` (+${summary.differences.length - 1} pairs)` : '';
    estimate = `Δ[${first.a}−${first.b}] ${first.mean >= 0 ? '+' : ''}${fixed(first.mean, d)} ± ${fixed(first.half_width, d)}${more}`;
  } else if (summary?.mean !== undefined && halfWidth !== undefined) {
    const d = decimalsFor(halfWidth);
    estimate = `${fixed(summary.mean, d)} ± ${fixed(halfWidth, d)}`;
  }
  const done = run.kind === 'comparison' ? Number((summary as { episodes?: number } | null)?.episodes ?? 0) : run.episodesDone;
  const episodes = run.status === 'done' ? count(done) : `${count(done)}/${count(run.episodesRequested)}`;
  const policy = run.kind === 'comparison' ? run.policy.label.split(' vs ').map((p) => p.split('/').pop()).join(' vs ') : run.policy.label;
  const shard = run.shard ? ` [${run.shard.index}/${run.shard.count}]` : '';
  const method = run.kind === 'offpolicy' ? 'off-policy, BCa' : methodOf(run);
  return [id, shortTime(run.createdAt), clip(run.env.label, 28), clip(policy, 40), episodes + shard, estimate, method, run.status];
}

/** An off-policy run's headline: the weighted doubly robust estimate (else the first) ± its BCa half-width. */
function offPolicyEstimate(summary: Record<string, unknown> | null): string {
  const estimates = (summary?.estimates ?? []) as { name: string; estimate: number | null; intervals: { bootstrap: { low: number | null; high: number | null } | null } }[];
  const chosen = estimates.find((e) => e.name === 'wdr') ?? estimates[0];
  if (!chosen || chosen.estimate === null) return '';
  const b = chosen.intervals.bootstrap;
  if (!b || b.low === null || b.high === null) return `${chosen.name} ${chosen.estimate.toPrecision(4)}`;
  const halfWidth = (b.high - b.low) / 2;
  const d = decimalsFor(halfWidth);
  return `${chosen.name} ${fixed(chosen.estimate, d)} ± ${fixed(halfWidth, d)}`;
}

/**
 * One line a run, newest first: what `reckon runs list` prints. A comparison's member runs
 * (one a policy), when given, follow it, indented.
 */
export function runsListText(runs: readonly RunRecord[], members: ReadonlyMap<string, readonly RunRecord[]> = new Map()): string {
  if (runs.length === 0) return "No runs stored yet. Start one with 'reckon estimate --env F --policy F'.\n";
  // Labels get a column when any run listed has one.
  const labelled = runs.some((r) => Object.keys(r.labels ?? {}).length > 0);
  const labelsOf = (run: RunRecord) => (labelled ? [clipEnd(Object.entries(run.labels ?? {}).map(([k, v]) => `${k}=${v}`).join(', '), 40)] : []);
  const rows = [['id', 'started (UTC)', 'environment', 'policy', 'episodes', 'mean ± half-width', 'interval', 'status', ...(labelled ? ['labels'] : [])]];
  for (const run of runs) {
    rows.push([...rowOf(run, run.id), ...labelsOf(run)]);
    for (const member of members.get(run.id) ?? []) rows.push([...rowOf(member, `  └ ${member.id}`), ...labelsOf(member)]);
  }
  return columns(rows, '').map((line) => line.trimEnd()).join('\n') + '\n';
}
