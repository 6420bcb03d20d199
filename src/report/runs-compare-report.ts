import type { RunsComparison } from '../evaluate/runs-compare.js';
import { compareJson } from './compare-json.js';
import { compareText } from './compare-text.js';
import { columns, count, decimalsFor, fixed, sig } from './format.js';
import { annotationsJson } from './run-json.js';

function pText(p: number): string {
  return p < 1e-4 ? '< 0.0001' : p.toFixed(4);
}

function envChangeJson(c: RunsComparison) {
  return c.envChange ? { runs: c.envChange.runs.map((r) => ({ run_id: r.runId, env: r.env, env_hash: r.envHash })), differences: c.envChange.differences } : null;
}

/**
 * `runs compare --json`. Paired runs give the `compare --json` object (the same keys and, for
 * the same policies, seed and episodes, the same figures), each policy's `run_id` the stored
 * run it came from. Unpaired runs give the same outline with Welch's intervals, and
 * `reasons` says why they could not be paired. Both add `paired`, `runs` and `env_change`.
 */
export function runsCompareJson(c: RunsComparison, toolVersion: string, storedId: string | null = null) {
  const ids = c.runs.map((r) => r.id);
  const common = {
    paired: c.paired,
    reasons: c.reasons,
    runs: ids,
    members: ids,
    env_change: envChangeJson(c),
  };
  if (c.comparison) return { ...compareJson(c.comparison, c.labels, toolVersion, storedId, ids), ...common };
  const u = c.unpaired!;
  return {
    run_id: storedId,
    env: c.labels.env,
    seed: null,
    start: c.runs[0].start,
    noise: c.runs.every((r) => r.noise === c.runs[0].noise) ? c.runs[0].noise : null,
    episodes: null,
    level: u.level,
    policies: u.estimates.map((e, p) => ({
      name: c.labels.policies[p],
      run_id: ids[p],
      env: c.runs[p].env.label,
      env_hash: c.runs[p].env.hash,
      seed: c.runs[p].seed,
      mean: e.summary.mean,
      std: e.summary.std,
      ci: { low: e.interval.low, high: e.interval.high, method: e.interval.method, level: e.interval.level },
      episodes: e.summary.n,
      rank: e.rank,
      mean_length: e.meanLength,
    })),
    differences: u.pairs.map((pair) => ({
      a: pair.first,
      b: pair.second,
      mean: pair.welch.meanDifference,
      low: pair.welch.low,
      high: pair.welch.high,
      method: 'welch',
      std_error: pair.welch.standardError,
      degrees_of_freedom: pair.welch.degreesOfFreedom,
      p_value: pair.welch.pValue,
      adjusted_p_value: pair.adjustedPValue,
      correlation: null,
      variance_reduction: null,
      probability_of_improvement: {
        estimate: pair.probabilityOfImprovement.estimate,
        low: pair.probabilityOfImprovement.interval.low,
        high: pair.probabilityOfImprovement.interval.high,
      },
    })),
    ranking: u.estimates.map((_, p) => p).sort((x, y) => u.estimates[x].rank - u.estimates[y].rank || x - y),
    p_value_adjustment: u.pairs.length > 1 ? 'holm' : 'none',
    reckon_version: toolVersion,
    ...common,
  };
}

/** `runs compare`'s report: the `compare` report for paired runs, Welch's for the others. */
export function runsCompareText(c: RunsComparison): string {
  const ids = c.runs.map((r) => r.id);
  const lines: string[] = [];
  if (c.envChange) {
    lines.push(`Runs of different environments (compared as asked with --allow-env-change):`);
    for (const r of c.envChange.runs) lines.push(`    ${r.runId}  ${r.env}  hash ${r.envHash.slice(0, 12)}`);
    lines.push('  What differs in the definitions:');
    for (const d of c.envChange.differences) lines.push(`    ${d}`);
    lines.push('');
  }
  if (c.comparison) {
    const first = c.runs[0];
    lines.push(`Stored runs ${ids.join(', ')} share environment, seed ${first.seed}, episodes ${first.firstEpisode}–${first.firstEpisode + first.episodesDone - 1} and noise: paired by episode, exactly as 'reckon compare' reports them.`);
    lines.push('');
    return `${lines.join('\n')}\n${compareText(c.comparison, c.labels)}`;
  }
  const u = c.unpaired!;
  const level = `${+(u.level * 100).toFixed(4)}%`;
  lines.push(`Stored runs ${ids.join(', ')} could not be paired episode by episode: ${c.reasons.join('; ')}.`);
  lines.push("  They are compared as independent samples (Welch's interval and test), which needs more episodes for the same precision than a paired comparison; to pair policies, run them with one seed and episode count ('reckon compare', or 'reckon estimate --seed S --episodes N' for each).");
  lines.push('');
  const widest = Math.max(...u.estimates.map((e) => (e.interval.high - e.interval.low) / 2), ...u.pairs.map((p) => (p.welch.high - p.welch.low) / 2));
  const d = decimalsFor(Math.min(widest, ...u.pairs.map((p) => (p.welch.high - p.welch.low) / 2)));
  const rows = [['rank', 'run', 'policy', 'seed', 'episodes', 'expected return', `${level} t interval`, 'mean length']];
  const order = u.estimates.map((_, p) => p).sort((x, y) => u.estimates[x].rank - u.estimates[y].rank || x - y);
  for (const p of order) {
    const e = u.estimates[p];
    rows.push([String(e.rank), `[${p}] ${ids[p]}`, c.labels.policies[p], String(c.runs[p].seed), count(e.summary.n), fixed(e.summary.mean, d), `${fixed(e.interval.low, d)} … ${fixed(e.interval.high, d)}`, sig(e.meanLength, 3)]);
  }
  lines.push(...columns(rows));
  const multiple = u.pairs.length > 1;
  lines.push('', `  Differences (first − second), ${level} Welch intervals:`);
  for (const pair of u.pairs) {
    const w = pair.welch;
    const pPart = multiple ? `p ${pText(w.pValue)}, Holm-adjusted ${pText(pair.adjustedPValue)}` : `p ${pText(w.pValue)}`;
    lines.push(`    [${pair.first}] − [${pair.second}]   ${w.meanDifference >= 0 ? '+' : ''}${fixed(w.meanDifference, d)}  (${fixed(w.low, d)} … ${fixed(w.high, d)}), ${pPart}, ${sig(w.degreesOfFreedom, 4)} degrees of freedom`);
    const poi = pair.probabilityOfImprovement;
    lines.push(`        P([${pair.first}] returns more than [${pair.second}]) ${poi.estimate.toFixed(3)} (${poi.interval.low.toFixed(3)} … ${poi.interval.high.toFixed(3)})`);
  }
  return `${lines.join('\n')}\n`;
}
