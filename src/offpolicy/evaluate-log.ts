/**
 * One off-policy evaluation of a log: every chosen estimator with its bootstrap intervals,
 * the lower bounds that hold at any sample size, and the diagnostics that say whether to
 * believe any of it. Pure computation on an already checked log and target.
 */
import type { EpisodeLog } from '../definitions/episode-log.js';
import { InputError } from '../errors.js';
import { summarize } from '../stats/summary.js';
import { tInterval } from '../stats/t-interval.js';
import { consistentWeightedPerDecisionInfluence, consistentWeightedPerDecisionSums } from '../stats/off-policy/consistent-weighted-per-decision.js';
import { doublyRobustValues, type StepModelValues } from '../stats/off-policy/doubly-robust.js';
import { episodeBootstrap, meanBootstrap } from '../stats/off-policy/episode-bootstrap.js';
import { MIN_RESAMPLES } from '../stats/bootstrap-resample.js';
import { heldOutLowerBound } from '../stats/off-policy/high-confidence-lower-bound.js';
import { importanceSamplingValues } from '../stats/off-policy/importance-sampling.js';
import { nonnegativeBettingLowerBound } from '../stats/off-policy/nonnegative-betting-lower-bound.js';
import { perDecisionValues } from '../stats/off-policy/per-decision-importance-sampling.js';
import { weightedDoublyRobustInfluence, weightedDoublyRobustSums } from '../stats/off-policy/weighted-doubly-robust.js';
import { discountedReturns, finalWeights, type WeightedEpisodes } from '../stats/off-policy/weighted-episodes.js';
import { crossFittedModelValues } from './cross-fitted-model.js';
import { checkSupport, offPolicyDiagnostics, type OffPolicyDiagnostics } from './diagnostics.js';
import type { TargetOnLog } from './target-on-log.js';
import { twoSidedBettingInterval } from './two-sided-betting.js';
import { weightedEpisodes } from './weights-on-log.js';

export const ESTIMATORS = ['is', 'wis', 'pdis', 'cwpdis', 'dr', 'wdr'] as const;
export type EstimatorName = (typeof ESTIMATORS)[number];

export const ESTIMATOR_TITLES: Record<EstimatorName, string> = {
  is: 'importance sampling',
  wis: 'weighted importance sampling',
  pdis: 'per-decision IS',
  cwpdis: 'consistent weighted per-decision IS',
  dr: 'doubly robust (cross-fitted model)',
  wdr: 'weighted doubly robust (cross-fitted model)',
};

/** Unbiased estimators: means of independent per-episode values. */
const MEAN_TYPE: ReadonlySet<EstimatorName> = new Set(['is', 'pdis', 'dr']);

export interface OffPolicyOptions {
  readonly estimators: readonly EstimatorName[];
  readonly level: number;
  readonly seed: number;
  readonly resamples: number;
  readonly folds: number;
  readonly discount: number;
  /** The problem's horizon, for the model's look-ahead (the longest episode when unknown). */
  readonly horizon: number | null;
  /** Bounds of any episode's return, G_min ≤ G ≤ G_max; null when no reward bounds are known. */
  readonly returnBounds: readonly [number, number] | null;
  /** The largest possible W from the two policies' probabilities, or null when the behaviour's distribution is not logged. */
  readonly maxWeight: number | null;
  /** Why the largest weight is unknown, when the caller knows (said in the two-sided interval's note). */
  readonly maxWeightMissing?: string | null;
}

/**
 * Steps × resamples allowed for the bootstrap of CWPDIS and WDR, whose replicates pass over
 * every step: about a second on one core. Fewer resamples are used on longer logs (never fewer
 * than the minimum), and the report says how many.
 */
export const STEP_REPLICATE_BUDGET = 2e8;

export interface EstimatorResult {
  readonly name: EstimatorName;
  readonly estimate: number;
  /** Bootstrap resamples used for this estimator. */
  readonly resamples: number;
  /** Approximate: BCa and percentile bootstrap over episodes; t for the means of per-episode values. */
  readonly intervals: {
    readonly bootstrap: readonly [number, number];
    readonly bootstrapPercentile: readonly [number, number];
    readonly t: readonly [number, number] | null;
  };
}

export interface BoundResult {
  readonly method: 'betting-lower' | 'high-confidence-lower' | 'betting';
  readonly low: number;
  readonly high: number | null;
  /** Why the bound is missing, when it is. */
  readonly note?: string;
  readonly threshold?: number;
  readonly heldOut?: number;
}

export interface OffPolicyResult {
  readonly episodes: number;
  readonly steps: number;
  readonly level: number;
  readonly estimators: readonly EstimatorResult[];
  readonly bounds: readonly BoundResult[];
  readonly diagnostics: OffPolicyDiagnostics;
  readonly folds: number;
  readonly resamples: number;
}

export function evaluateLog(log: EpisodeLog, target: TargetOnLog, options: OffPolicyOptions): OffPolicyResult {
  checkSupport(log, target);
  const episodes = weightedEpisodes(log, target, options.discount);
  const n = log.episodeIds.length;
  if (n < 2) throw new InputError(log.label, `has ${n} episode; intervals and diagnostics need at least 2`);
  const diagnostics = offPolicyDiagnostics(log, target, episodes, options.level);
  const needsModel = options.estimators.some((e) => e === 'dr' || e === 'wdr');
  const folds = Math.min(options.folds, n);
  const model = needsModel
    ? crossFittedModelValues(log, target, { folds, discount: options.discount, horizon: options.horizon ?? 0 })
    : null;
  const estimators = options.estimators.map((name) => estimateWithIntervals(name, episodes, model, options));
  return {
    episodes: n,
    steps: log.state.length,
    level: options.level,
    estimators,
    bounds: lowerBounds(episodes, options),
    diagnostics,
    folds,
    resamples: options.resamples,
  };
}

function estimateWithIntervals(name: EstimatorName, episodes: WeightedEpisodes, model: StepModelValues | null, options: OffPolicyOptions): EstimatorResult {
  const n = episodes.episodeStart.length - 1;
  const bootstrapOptions = { resamples: options.resamples, seed: options.seed };
  if (MEAN_TYPE.has(name)) {
    const values = name === 'is' ? importanceSamplingValues(episodes) : name === 'pdis' ? perDecisionValues(episodes) : doublyRobustValues(episodes, model!);
    const summary = summarize(values);
    const boot = meanBootstrap(values, summary.mean, options.level, bootstrapOptions);
    const t = tInterval(summary, options.level);
    return { name, estimate: summary.mean, resamples: options.resamples, intervals: { bootstrap: boot.bca, bootstrapPercentile: boot.percentile, t: [t.low, t.high] } };
  }
  let estimate: number;
  let replicate: (counts: Float64Array) => number;
  let influence: Float64Array;
  if (name === 'wis') {
    const w = finalWeights(episodes);
    const g = discountedReturns(episodes);
    replicate = (c) => {
      let num = 0;
      let den = 0;
      for (let i = 0; i < n; i++) {
        num += c[i] * w[i] * g[i];
        den += c[i] * w[i];
      }
      return den > 0 ? num / den : Number.NaN;
    };
    estimate = replicate(new Float64Array(n).fill(1));
    const meanWeight = w.reduce((a, b) => a + b, 0) / n;
    influence = w.map((wi, i) => (meanWeight > 0 ? (wi * (g[i] - estimate)) / meanWeight : 0));
    const boot = episodeBootstrap(n, estimate, replicate, influence, options.level, bootstrapOptions);
    return { name, estimate, resamples: options.resamples, intervals: { bootstrap: boot.bca, bootstrapPercentile: boot.percentile, t: null } };
  }
  // A replicate of a per-step normalised estimator costs a pass over every step: bounded work.
  const resamples = Math.min(options.resamples, Math.max(MIN_RESAMPLES, Math.floor(STEP_REPLICATE_BUDGET / episodes.reward.length)));
  if (name === 'cwpdis') {
    const sums = consistentWeightedPerDecisionSums(episodes);
    estimate = sums.estimate();
    replicate = (c) => sums.estimate(c);
    influence = consistentWeightedPerDecisionInfluence(episodes);
  } else {
    const sums = weightedDoublyRobustSums(episodes, model!);
    estimate = sums.estimate();
    replicate = (c) => sums.estimate(c);
    influence = weightedDoublyRobustInfluence(episodes, model!);
  }
  const boot = episodeBootstrap(n, estimate, replicate, influence, options.level, { ...bootstrapOptions, resamples });
  return { name, estimate, resamples, intervals: { bootstrap: boot.bca, bootstrapPercentile: boot.percentile, t: null } };
}

/**
 * The bounds that need no large-sample approximation, on X_i = W_i (G_i − G_min)/(G_max − G_min)
 * ≥ 0, whose mean is (V^π − G_min)/(G_max − G_min) when the target's support lies in the
 * behaviour's (E_μ[W] = 1).
 */
function lowerBounds(episodes: WeightedEpisodes, options: OffPolicyOptions): BoundResult[] {
  const bounds = options.returnBounds;
  if (!bounds || !(bounds[1] > bounds[0])) {
    const note = 'needs reward bounds (the header\'s reward_bounds, or --env) and a horizon or a discount below 1';
    return [
      { method: 'betting-lower', low: Number.NaN, high: null, note },
      { method: 'high-confidence-lower', low: Number.NaN, high: null, note },
    ];
  }
  const [gMin, gMax] = bounds;
  const range = gMax - gMin;
  const w = finalWeights(episodes);
  const g = discountedReturns(episodes);
  const x = w.map((wi, i) => (wi * (g[i] - gMin)) / range);
  // Lower bounds are one-sided at the stated level: P(V^π ≥ bound) ≥ level.
  const betting = nonnegativeBettingLowerBound(x, options.level);
  const held = heldOutLowerBound(x, options.level, options.seed);
  const out: BoundResult[] = [
    { method: 'betting-lower', low: gMin + range * betting, high: null },
    Number.isFinite(held.lowerBound)
      ? { method: 'high-confidence-lower', low: gMin + range * Math.max(0, held.lowerBound), high: null, threshold: held.threshold, heldOut: held.heldOut }
      : { method: 'high-confidence-lower', low: Number.NaN, high: null, note: `needs at least ${held.heldOut + 2} episodes (${held.heldOut} are held out to choose the threshold)` },
  ];
  const twoSided = options.maxWeight === null ? null : twoSidedBettingInterval(x, options.maxWeight, options.level);
  out.push(
    twoSided
      ? { method: 'betting', low: gMin + range * twoSided[0], high: gMin + range * twoSided[1] }
      : { method: 'betting', low: Number.NaN, high: null, note: `needs the largest possible weight: ${options.maxWeightMissing ?? 'give --behaviour FILE with a gridworld or tabular --env, or a log with behaviour_probs and that --env'}` },
  );
  return out;
}
