import { InputError } from '../errors.js';
import type { Db } from '../store/open.js';
import { loadEpisodes, refuseIfLive, type RunRecord, type StoredEpisodes } from '../store/runs.js';
import { holmAdjust, type DifferenceMethod } from '../stats/index.js';
import { probabilityOfImprovementInterval, type ImprovementEstimate } from '../stats/probability-of-improvement.js';
import { rankByMean } from '../stats/policy-ranking.js';
import { summarize, type ReturnSummary } from '../stats/summary.js';
import { tInterval } from '../stats/t-interval.js';
import { welchComparison, type WelchComparison } from '../stats/welch.js';
import type { Interval } from '../stats/interval.js';
import { summarizeComparison, type CompareRequest, type ComparisonResult } from './compare.js';
import type { EnvironmentFacts } from './environment-facts.js';
import { ReturnsBuffer } from './returns-buffer.js';
import { definitionDifferences } from './definition-differences.js';

export interface RunsCompareOptions {
  /** Interval of each paired difference (as `compare --ci`); unpaired pairs always use Welch's. */
  readonly method: DifferenceMethod;
  readonly level: number;
  readonly interquartileMean: boolean;
  /** Compare runs of different environment hashes (unpaired, with the difference named). */
  readonly allowEnvChange: boolean;
}

/** Runs of different environments, compared anyway: which run used which, and what differs. */
export interface EnvironmentChange {
  readonly runs: readonly { runId: string; env: string; envHash: string }[];
  /** Where the definitions differ (`discount: 0.95 → 0.9`), between the first run's and each other. */
  readonly differences: readonly string[];
}

export interface UnpairedEstimate {
  readonly summary: ReturnSummary;
  readonly interval: Interval;
  readonly meanLength: number;
  readonly rank: number;
}

export interface UnpairedPair {
  readonly first: number;
  readonly second: number;
  readonly welch: WelchComparison;
  readonly adjustedPValue: number;
  readonly probabilityOfImprovement: ImprovementEstimate;
}

export interface RunsComparison {
  readonly runs: readonly RunRecord[];
  /** True when the runs shared their random numbers and were compared episode by episode. */
  readonly paired: boolean;
  /** Why they could not be paired (empty when paired). */
  readonly reasons: readonly string[];
  readonly envChange: EnvironmentChange | null;
  /** The paired comparison, figure for figure what `compare` reports (paired only). */
  readonly comparison: ComparisonResult | null;
  /** Each run's estimate and every pair's Welch comparison (unpaired only). */
  readonly unpaired: { readonly estimates: readonly UnpairedEstimate[]; readonly pairs: readonly UnpairedPair[]; readonly level: number } | null;
  readonly labels: { readonly env: string; readonly policies: readonly string[] };
}

function range(run: RunRecord): string {
  return `${run.firstEpisode}–${run.firstEpisode + run.episodesDone - 1}`;
}

/** Checks the runs can be compared at all: estimate runs with figures, not running, each once. */
function checkRuns(runs: readonly RunRecord[], allowEnvChange: boolean): void {
  if (runs.length < 2) throw new InputError('runs compare', `needs two or more run ids (got ${runs.length}); see them with 'reckon runs list'`);
  const seen = new Set<string>();
  for (const run of runs) {
    if (seen.has(run.id)) throw new InputError(`run ${run.id}`, 'is given twice; give each run once');
    seen.add(run.id);
    if (run.kind === 'comparison') throw new InputError(`run ${run.id}`, "is a comparison: compare its member runs (one a policy; 'reckon runs show " + run.id + " --json' lists them in members)");
    if (run.kind !== 'estimate') throw new InputError(`run ${run.id}`, `is an ${run.kind} run: it has no episodes of its own to compare`);
    refuseIfLive(run, 'compare it');
    if (run.episodesDone < 2) throw new InputError(`run ${run.id}`, `has ${run.episodesDone} episode(s) stored: too few to compare`);
  }
  const first = runs[0];
  const other = runs.find((r) => r.env.hash !== first.env.hash);
  if (other && !allowEnvChange) {
    throw new InputError(
      `run ${other.id}`,
      `ran another environment (${other.env.label}, hash ${other.env.hash.slice(0, 12)}) than run ${first.id} (${first.env.label}, hash ${first.env.hash.slice(0, 12)}); give --allow-env-change to compare them anyway (unpaired, with the difference named)`,
    );
  }
}

/** Why runs did not share their random numbers, episode by episode (empty: they did). */
export function pairingObstacles(runs: readonly RunRecord[]): string[] {
  const first = runs[0];
  const reasons: string[] = [];
  const differ = (what: string, value: (r: RunRecord) => string) => {
    const odd = runs.filter((r) => value(r) !== value(first));
    if (odd.length) reasons.push(`${what} differ (${[first, ...odd].map((r) => `${value(r)} in ${r.id}`).join(', ')})`);
  };
  differ('environment hashes', (r) => r.env.hash.slice(0, 12));
  differ('seeds', (r) => String(r.seed));
  differ('episode ranges', range);
  differ('noise modes', (r) => r.noise);
  differ('start states', (r) => r.start ?? 'the start distribution');
  return reasons;
}

/**
 * Compares stored estimate runs without running an episode. Runs of one environment, seed,
 * episode range, noise mode and start ran on common random numbers, so episode i of each faced
 * the same environment noise: they are paired and analysed by the very code `compare` uses
 * (`summarizeComparison`), which gives its figures bit for bit. Otherwise each pair gets
 * Welch's interval and test (docs/methods.md §8.6), Holm-adjusted for three or more runs.
 */
export function compareStoredRuns(db: Db, runs: readonly RunRecord[], options: RunsCompareOptions): RunsComparison {
  checkRuns(runs, options.allowEnvChange);
  const reasons = pairingObstacles(runs);
  const envChange: EnvironmentChange | null = runs.some((r) => r.env.hash !== runs[0].env.hash)
    ? {
        runs: runs.map((r) => ({ runId: r.id, env: r.env.label, envHash: r.env.hash })),
        differences: runs.slice(1).flatMap((r) => (r.env.hash === runs[0].env.hash ? [] : definitionDifferences(runs[0].env.json, r.env.json).map((d) => `${runs[0].id} → ${r.id}: ${d}`))),
      }
    : null;
  const labels = { env: runs[0].env.label, policies: runs.map((r) => r.policy.label) };
  const episodes = runs.map((r) => loadEpisodes(db, r));
  if (reasons.length === 0) return { runs, paired: true, reasons, envChange, comparison: pairedComparison(runs, episodes, options), unpaired: null, labels };

  const summaries = episodes.map((e) => summarize(e.returns));
  const { rank } = rankByMean(summaries.map((s) => s.mean));
  const estimates = summaries.map((summary, p) => {
    let lengthSum = 0;
    for (const l of episodes[p].lengths) lengthSum += l;
    return { summary, interval: tInterval(summary, options.level), meanLength: lengthSum / episodes[p].lengths.length, rank: rank[p] };
  });
  const raw: Omit<UnpairedPair, 'adjustedPValue'>[] = [];
  for (let i = 0; i < runs.length; i++) {
    for (let j = i + 1; j < runs.length; j++) {
      raw.push({
        first: i,
        second: j,
        welch: welchComparison(summaries[i], summaries[j], options.level),
        probabilityOfImprovement: probabilityOfImprovementInterval(episodes[i].returns, episodes[j].returns, options.level, { resampling: 'independent' }),
      });
    }
  }
  const adjusted = raw.length > 1 ? holmAdjust(raw.map((p) => p.welch.pValue)) : raw.map((p) => p.welch.pValue);
  const pairs = raw.map((p, q) => ({ ...p, adjustedPValue: adjusted[q] }));
  return { runs, paired: false, reasons, envChange, comparison: null, unpaired: { estimates, pairs, level: options.level }, labels };
}

/** The figures `compare` would have printed for these policies, seed and episodes. */
function pairedComparison(runs: readonly RunRecord[], episodes: readonly StoredEpisodes[], options: RunsCompareOptions): ComparisonResult {
  const facts = runs.map((r) => r.facts as EnvironmentFacts);
  const buffers = episodes.map((e, p) => {
    const buffer = new ReturnsBuffer(e.returns.length, facts[p].horizon);
    buffer.append(e.returns, e.lengths, e.finals);
    return buffer;
  });
  const first = runs[0];
  const request: CompareRequest = {
    env: { json: first.env.json, source: { label: first.env.label, baseDir: first.env.baseDir } },
    policies: runs.map((r) => ({ json: r.policy.json, source: { label: r.policy.label, baseDir: r.policy.baseDir } })),
    seed: first.seed,
    start: first.start,
    noise: first.noise,
    episodes: first.episodesDone,
    workers: Math.max(...runs.map((r) => Number((r.options as { workers?: number }).workers ?? 1))),
    method: options.method,
    sequence: null,
    level: options.level,
    bounds: null,
    sigma: null,
    targetError: null,
    interquartileMean: options.interquartileMean,
  };
  const seconds = runs.reduce((s, r) => s + r.seconds, 0);
  return summarizeComparison(request, facts, buffers, null, seconds, false);
}
