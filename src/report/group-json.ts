import type { GroupComparison } from '../stats/groups/index.js';
import { groupAdviceText } from './group-advice.js';

/** The `groups` and `group_differences` keys of `compare --json` (empty without `--group`). */
export function groupsJson(groups: GroupComparison | null) {
  if (!groups) return { groups: [], group_differences: [] };
  return {
    groups: groups.groups.map((g) => ({
      name: g.name,
      members: g.members,
      episodes: g.components.episodes,
      member_means: Array.from(g.components.memberMeans),
      mean: g.mean,
      standard_error: g.standardError,
      ci: { low: g.interval.low, high: g.interval.high, method: g.interval.method, level: g.interval.level, degrees_of_freedom: g.interval.degreesOfFreedom },
      seed_bootstrap: g.seedBootstrap ? { low: g.seedBootstrap.low, high: g.seedBootstrap.high, method: g.seedBootstrap.method } : null,
      iqm: { estimate: g.interquartileMean.estimate, low: g.interquartileMean.interval.low, high: g.interquartileMean.interval.high, method: 'bootstrap-over-members' },
      naive: { low: g.naive.low, high: g.naive.high, standard_error: g.naiveStandardError, method: g.naive.method },
      variance: {
        between_seeds: g.components.betweenVariance,
        within_policy: g.components.withinVariance,
        mean_square_between: g.components.meanSquareBetween,
        mean_square_within: g.components.meanSquareWithin,
        shared_covariance: g.components.sharedCovariance,
        icc: g.components.intraclassCorrelation,
        design_effect: g.components.designEffect,
      },
      uncertainty: { seed_variance: g.seedVariance, episode_variance: g.episodeVariance, episode_share: g.episodeShare },
      half_width_with_unlimited_episodes: g.halfWidthWithUnlimitedEpisodes,
      advice: g.advice,
      advice_text: groupAdviceText(g),
    })),
    group_differences: groups.pairs.map((p) => ({
      a: p.first,
      b: p.second,
      mean: p.mean,
      low: p.interval.low,
      high: p.interval.high,
      method: p.interval.method,
      degrees_of_freedom: p.degreesOfFreedom,
      p_value: p.pValue,
      adjusted_p_value: p.adjustedPValue,
      probability_of_improvement: {
        estimate: p.probabilityOfImprovement.estimate,
        low: p.probabilityOfImprovement.interval.low,
        high: p.probabilityOfImprovement.interval.high,
      },
    })),
  };
}
