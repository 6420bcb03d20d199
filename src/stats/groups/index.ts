/** Groups of policies from several training seeds: two-level summaries, differences, planning. */
export { varianceComponents, type VarianceComponents } from './variance-components.js';
export { sharedEpisodeCovariance } from './shared-episode-covariance.js';
export { groupMean, SEED_BOOTSTRAP_FROM, type GroupMean, type GroupAdvice, type GroupMeanOptions } from './group-mean.js';
export { welchDifference, type GroupDifference } from './welch-difference.js';
export { compareGroups, type PolicyGroup, type GroupComparison, type GroupPairResult } from './group-comparison.js';
export { episodesPerMember, seedsForHalfWidth, seedsForPower, twoSampleTestPower } from './seed-planning.js';
export type { GroupInterval, GroupIntervalMethod } from './group-interval.js';
