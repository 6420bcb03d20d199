/**
 * What says whether an off-policy estimate can be believed: how many episodes the weights
 * effectively leave, how much the largest one dominates, whether the weights average 1 as they
 * must, and whether the target acts where the behaviour never did. Printed with every estimate.
 */
import type { EpisodeLog } from '../definitions/episode-log.js';
import { InputError } from '../errors.js';
import { kishEffectiveSampleSize } from '../stats/off-policy/kish-effective-sample-size.js';
import { finalWeights, longestEpisode, type WeightedEpisodes } from '../stats/off-policy/weighted-episodes.js';
import { summarize } from '../stats/summary.js';
import { tInterval } from '../stats/t-interval.js';
import type { TargetOnLog } from './target-on-log.js';

/** Below this share of effective episodes the report says in words that the log says little about the target. */
export const LOW_ESS_FRACTION = 0.01;

export interface OffPolicyDiagnostics {
  /** Kish ESS of the final weights. */
  readonly ess: number;
  readonly essFraction: number;
  /** Kish ESS of ρ_{0:t} at each step t (finished episodes with their final weight). */
  readonly stepEss: Float64Array;
  /** Mean of ρ_{0:t} at each step t; 1 in expectation. */
  readonly stepMeanWeight: Float64Array;
  readonly meanWeight: number;
  /** Approximate t interval for E[W], which is 1 when the logged probabilities are right and the support holds. */
  readonly meanWeightInterval: readonly [number, number];
  readonly maxWeight: number;
  readonly maxWeightShare: number;
  readonly zeroWeightFraction: number;
  /** Visited states where the target puts mass on an action never logged there. */
  readonly unloggedActionStates: number;
  readonly warnings: readonly string[];
  /** A sentence for people when the weights leave almost nothing, else null. */
  readonly verdict: string | null;
  /** The final weights, for the histogram. */
  readonly weights: Float64Array;
}

/** The diagnostics of a log whose support {@link checkSupport} has passed. */
export function offPolicyDiagnostics(log: EpisodeLog, target: TargetOnLog, episodes: WeightedEpisodes, level: number): OffPolicyDiagnostics {
  const weights = finalWeights(episodes);
  const n = weights.length;
  const ess = kishEffectiveSampleSize(weights);
  const summary = summarize(weights);
  const interval = tInterval(summary, level);
  let total = 0;
  let zero = 0;
  for (const w of weights) {
    total += w;
    if (w === 0) zero++;
  }
  const longest = longestEpisode(episodes);
  // Σ ρ and Σ ρ² per step, a finished episode entering every later step with its final weight
  const sums = new Float64Array(longest);
  const squares = new Float64Array(longest);
  const frozenSum = new Float64Array(longest + 1);
  const frozenSquares = new Float64Array(longest + 1);
  for (let i = 0; i < n; i++) {
    const first = episodes.episodeStart[i];
    const length = episodes.episodeStart[i + 1] - first;
    for (let t = 0; t < length; t++) {
      const w = episodes.weight[first + t];
      sums[t] += w;
      squares[t] += w * w;
    }
    frozenSum[length] += weights[i];
    frozenSquares[length] += weights[i] * weights[i];
  }
  const stepEss = new Float64Array(longest);
  const stepMeanWeight = new Float64Array(longest);
  let carriedSum = 0;
  let carriedSquares = 0;
  for (let t = 0; t < longest; t++) {
    carriedSum += frozenSum[t];
    carriedSquares += frozenSquares[t];
    const sum = sums[t] + carriedSum;
    const square = squares[t] + carriedSquares;
    stepEss[t] = square > 0 ? (sum * sum) / square : 0;
    stepMeanWeight[t] = sum / n;
  }
  const warnings: string[] = [];
  const unlogged = unloggedActions(log, target);
  if (unlogged.states > 0) {
    warnings.push(
      `in ${unlogged.states} visited state${unlogged.states === 1 ? '' : 's'} the target takes an action never logged there (first: state ${JSON.stringify(unlogged.state)}, action ${JSON.stringify(unlogged.action)}, line ${unlogged.line}); if the behaviour could never take it, every estimate is biased`,
    );
  }
  if (!(interval.low <= 1 && 1 <= interval.high)) {
    warnings.push(
      `the mean weight ${summary.mean.toPrecision(4)} has a ${Math.round(level * 100)}% interval (${interval.low.toPrecision(4)} … ${interval.high.toPrecision(4)}) that excludes 1: the logged behaviour probabilities may be wrong, or the target acts where the behaviour never does`,
    );
  }
  const essFraction = ess / n;
  const verdict =
    essFraction < LOW_ESS_FRACTION
      ? `The weights leave about ${ess.toPrecision(3)} effective episodes of ${n} (${(100 * essFraction).toPrecision(2)}%): the log says very little about this target policy, and no interval here deserves trust. Log episodes from a behaviour closer to the target, or many more of them.`
      : null;
  return {
    ess,
    essFraction,
    stepEss,
    stepMeanWeight,
    meanWeight: summary.mean,
    meanWeightInterval: [interval.low, interval.high],
    maxWeight: summary.max,
    maxWeightShare: total > 0 ? summary.max / total : Number.NaN,
    zeroWeightFraction: zero / n,
    unloggedActionStates: unlogged.states,
    warnings,
    verdict,
    weights,
  };
}

/**
 * A target that takes, in a visited state, an action the behaviour could never take there
 * (probability 0 in the logged distribution, or an action outside the header's list) makes
 * every importance-sampling estimate biased: refused.
 */
export function checkSupport(log: EpisodeLog, target: TargetOnLog): void {
  const width = target.actionNames.length;
  const logged = log.actionNames.length;
  const fixedActions = log.header?.actions !== undefined;
  const firstLine = firstStepLines(log);
  for (let s = 0; s < log.stateNames.length; s++) {
    if (firstLine[s] === 0) continue;
    for (let a = 0; a < width; a++) {
      const p = target.probability[s * width + a];
      if (!(p > 0)) continue;
      const known = a < logged ? log.behaviourDistribution[s * logged + a] : fixedActions ? 0 : Number.NaN;
      if (known === 0) {
        throw new InputError(
          `${log.label}: line ${firstLine[s]}`,
          `the target takes action ${JSON.stringify(target.actionNames[a])} in state ${JSON.stringify(log.stateNames[s])} with probability ${p.toPrecision(3)}, but the behaviour never could (${a < logged ? 'its logged probability is 0' : 'not among the header\'s actions'}): importance weights cannot account for it`,
        );
      }
    }
  }
}

/** The line of the first step taken in each state, 0 for states only reached. */
function firstStepLines(log: EpisodeLog): Int32Array {
  const lines = new Int32Array(log.stateNames.length);
  for (let k = 0; k < log.state.length; k++) {
    const s = log.state[k];
    if (lines[s] === 0 || log.line[k] < lines[s]) lines[s] = log.line[k];
  }
  return lines;
}

function unloggedActions(log: EpisodeLog, target: TargetOnLog): { states: number; state?: string; action?: string; line?: number } {
  const width = target.actionNames.length;
  const seen = new Uint8Array(log.stateNames.length * width);
  const visited = new Uint8Array(log.stateNames.length);
  for (let k = 0; k < log.state.length; k++) {
    seen[log.state[k] * width + log.action[k]] = 1;
    visited[log.state[k]] = 1;
  }
  const lines = firstStepLines(log);
  let states = 0;
  let first: { state: string; action: string; line: number } | undefined;
  for (let s = 0; s < log.stateNames.length; s++) {
    if (!visited[s]) continue;
    let missing = -1;
    for (let a = 0; a < width; a++) if (target.probability[s * width + a] > 0 && !seen[s * width + a]) missing = missing < 0 ? a : missing;
    if (missing >= 0) {
      states++;
      if (!first || lines[s] < first.line) first = { state: log.stateNames[s], action: target.actionNames[missing], line: lines[s] };
    }
  }
  return { states, ...first };
}
