import type { RunRecord } from '../store/runs.js';
import { columns, count, decimalsFor, fixed } from './format.js';

function shortTime(iso: string): string {
  return iso.replace('T', ' ').slice(0, 16);
}

function clip(text: string, width: number): string {
  return text.length <= width ? text : `…${text.slice(text.length - width + 1)}`;
}

/** One line a run, newest first: what `reckon runs list` prints. */
export function runsListText(runs: readonly RunRecord[]): string {
  if (runs.length === 0) return "No runs stored yet. Start one with 'reckon estimate --env F --policy F'.\n";
  const rows = [['id', 'started (UTC)', 'environment', 'policy', 'episodes', 'mean ± half-width', 'status']];
  for (const run of runs) {
    const summary = run.summary as {
      mean?: number;
      ci?: { halfWidth?: number; level?: number; method?: string };
      differences?: { a: number; b: number; mean: number; half_width: number }[];
    } | null;
    let estimate = '';
    if (run.kind === 'comparison' && summary?.differences?.length) {
      const first = summary.differences[0];
      const d = decimalsFor(first.half_width);
      const more = summary.differences.length > 1 ? ` (+${summary.differences.length - 1} pairs)` : '';
      estimate = `Δ[${first.a}−${first.b}] ${first.mean >= 0 ? '+' : ''}${fixed(first.mean, d)} ± ${fixed(first.half_width, d)}${more}`;
    } else if (summary?.mean !== undefined && summary.ci?.halfWidth !== undefined) {
      const d = decimalsFor(summary.ci.halfWidth);
      estimate = `${fixed(summary.mean, d)} ± ${fixed(summary.ci.halfWidth, d)}`;
    }
    const done = run.kind === 'comparison' ? Number((summary as { episodes?: number } | null)?.episodes ?? 0) : run.episodesDone;
    const episodes = run.status === 'done' ? count(done) : `${count(done)}/${count(run.episodesRequested)}`;
    const policy = run.kind === 'comparison' ? run.policy.label.split(' vs ').map((p) => p.split('/').pop()).join(' vs ') : run.policy.label;
    const shard = run.shard ? ` [${run.shard.index}/${run.shard.count}]` : '';
    rows.push([run.id, shortTime(run.createdAt), clip(run.env.label, 28), clip(policy, 40), episodes + shard, estimate, run.status]);
  }
  return columns(rows, '').join('\n') + '\n';
}
