import { InputError } from '../../errors.js';
import { holmAdjust } from '../holm.js';
import { probabilityOfImprovementInterval, type ImprovementEstimate } from '../probability-of-improvement.js';
import { groupMean, type GroupMean } from './group-mean.js';
import { welchDifference, type GroupDifference } from './welch-difference.js';

/** A named set of policies trained by one method with different seeds. */
export interface PolicyGroup {
  name: string;
  /** Positions of the members among the compared policies. */
  members: number[];
}

export interface GroupPairResult extends GroupDifference {
  /** Positions in the group list; the difference is first − second. */
  first: number;
  second: number;
  /** Holm-adjusted over all pairs of groups (equals pValue for two groups). */
  adjustedPValue: number;
  /** P(a member of first is worth more than a member of second), Mann–Whitney over member means. */
  probabilityOfImprovement: ImprovementEstimate;
}

export interface GroupComparison {
  groups: (GroupMean & { name: string; members: number[] })[];
  pairs: GroupPairResult[];
}

/**
 * Groups of compared policies at the level of training methods: per group, the two-level
 * summary of {@link groupMean}; between groups, Welch's difference of group means, the
 * probability of improvement over members (Agarwal et al. 2021, with the Mann–Whitney
 * statistic of independent samples), and Holm's (1979) adjustment across pairs of groups.
 * `returns[p]` are policy p's returns, every policy on the same episodes.
 */
export function compareGroups(
  returns: readonly (Float64Array | number[])[],
  groups: readonly PolicyGroup[],
  options: { level: number; seed?: number; resamples?: number; sharedEpisodes?: boolean },
): GroupComparison {
  const shared = options.sharedEpisodes ?? true;
  for (const group of groups) {
    if (group.members.length < 2) throw new InputError(`--group ${group.name}`, `needs at least 2 members (got ${group.members.length})`);
    for (const m of group.members) if (!(m >= 0 && m < returns.length)) throw new RangeError(`compareGroups: member ${m} of ${group.name} is not a policy`);
  }
  const memberReturns = groups.map((g) => g.members.map((m) => returns[m]));
  const summaries = groups.map((group, g) => ({
    name: group.name,
    members: group.members,
    ...groupMean(memberReturns[g], { level: options.level, sharedEpisodes: shared, seed: options.seed, resamples: options.resamples }),
  }));
  const pairs: GroupPairResult[] = [];
  for (let i = 0; i < groups.length; i++) {
    for (let j = i + 1; j < groups.length; j++) {
      const difference = welchDifference(summaries[i].components, summaries[j].components, options.level, shared ? { a: memberReturns[i], b: memberReturns[j] } : null);
      pairs.push({
        first: i,
        second: j,
        ...difference,
        adjustedPValue: difference.pValue,
        probabilityOfImprovement: probabilityOfImprovementInterval(summaries[i].components.memberMeans, summaries[j].components.memberMeans, options.level, {
          resampling: 'independent',
        }),
      });
    }
  }
  const adjusted = holmAdjust(pairs.map((p) => p.pValue));
  pairs.forEach((p, q) => (p.adjustedPValue = adjusted[q]));
  return { groups: summaries, pairs };
}
