/** Public face of the statistics module: summaries, intervals for the mean, and projections. */
export { normalCdf, normalQuantile, tQuantile } from './quantiles.js';
export { summarize, type ReturnSummary } from './summary.js';
export { CI_METHODS, type CiMethod, type Interval } from './interval.js';
export type { ReturnBounds } from './return-bounds.js';
export { confidenceInterval, isCiMethod, type IntervalRequest } from './intervals.js';
export { tInterval } from './t-interval.js';
export { normalInterval } from './normal-interval.js';
export { hoeffdingHalfWidth, hoeffdingInterval } from './hoeffding.js';
export { bernsteinHalfWidth, bernsteinInterval } from './bernstein.js';
export { DEFAULT_RESAMPLES, type BootstrapOptions } from './bootstrap-resample.js';
export { bcaAcceleration, bcaBiasCorrection, bcaBootstrapInterval } from './bootstrap-bca.js';
export { percentileBootstrapInterval } from './bootstrap-percentile.js';
export { sortedQuantile } from './sample-quantile.js';
export {
  defaultTargets,
  episodesNeeded,
  projectionRuleFor,
  projectionTable,
  type ProjectionRequest,
  type ProjectionRow,
  type ProjectionRule,
} from './projection.js';
export { comparePolicies, type CompareOptions, type PolicyComparison, type PairResult, type PolicyStanding } from './compare-policies.js';
export { comparePair, DIFFERENCE_METHODS, type DifferenceMethod, type PairedComparison } from './paired-comparison.js';
export { holmAdjust } from './holm.js';
export { EmpiricalBernsteinSequence, episodesNeededEmpiricalBernstein } from './empirical-bernstein-sequence.js';
export { BettingSequence, type BetSchedule, type BettingOptions } from './betting-sequence.js';
export { episodesNeededBetting } from './betting-projection.js';
export { NormalMixtureSequence, episodesNeededNormalMixture } from './normal-mixture-sequence.js';
export { ChowRobbinsRule } from './chow-robbins.js';
export { differenceBounds, type RunningInterval, type SequentialInterval, type SequenceMethod } from './sequential-interval.js';
export { planEpisodes, type EpisodePlan } from './episode-plan.js';
export { pairedSampleSize, pairedTestPower } from './paired-sample-size.js';
