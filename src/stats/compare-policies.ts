import { InputError } from '../errors.js';
import { holmAdjust } from './holm.js';
import { interquartileMeanInterval } from './interquartile-mean-interval.js';
import type { Interval } from './interval.js';
import { comparePair, type DifferenceMethod, type PairedComparison } from './paired-comparison.js';
import { requireSamePairs } from './paired-differences.js';
import { rankByMean } from './policy-ranking.js';
import { probabilityOfImprovementInterval, type ImprovementEstimate } from './probability-of-improvement.js';
import { summarize } from './summary.js';

export interface CompareOptions {
  /** Two-sided confidence level for every interval, e.g. 0.95. */
  level: number;
  /** Interval for each paired difference (default `t`). */
  method?: DifferenceMethod;
  /** Run seed for all bootstrap draws (default 0). */
  seed?: number;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
  /** Also report each policy's interquartile mean with a bootstrap interval (default false). */
  interquartileMean?: boolean;
  /** Told how far each bootstrap has got (for a progress display). */
  onProgress?: (step: string, done: number, total: number) => void;
}

export interface PolicyStanding {
  /** Position of the policy in the input list. */
  policy: number;
  mean: number;
  /** 1 = highest mean; equal means share a rank. */
  rank: number;
  /** Present when requested. */
  interquartileMean?: { estimate: number; interval: Interval };
}

export interface PairResult extends PairedComparison {
  /** Input positions of the pair; differences are first − second. */
  first: number;
  second: number;
  /** Holm-adjusted p-value over all m = k(k−1)/2 pairs (equals `pValue` when k = 2). */
  adjustedPValue: number;
  /** P(G_first > G_second), ties ½, with a normal interval from the paired U-statistic variance. */
  probabilityOfImprovement: ImprovementEstimate;
}

export interface PolicyComparison {
  policies: PolicyStanding[];
  /** Every pair (i, j) with i < j, in lexicographic order. */
  pairs: PairResult[];
}

/**
 * Compares k ≥ 2 policies whose returns were drawn on the same episode indices (common random
 * numbers): every pair by {@link comparePair}, p-values adjusted by Holm (1979) across all
 * pairs, a ranking by mean, and the probability of improvement of Agarwal et al. (2021) per
 * pair; optionally the interquartile mean of each policy (docs/methods.md §8). Deterministic for a
 * given seed: every bootstrap draws from the seed's BOOTSTRAP stream.
 */
export function comparePolicies(returns: readonly (Float64Array | number[])[], options: CompareOptions): PolicyComparison {
  if (returns.length < 2) throw new InputError('--policy', `a comparison needs at least 2 policies (got ${returns.length})`);
  for (let i = 1; i < returns.length; i++) requireSamePairs(returns[0], returns[i]);
  const bootstrap = { seed: options.seed, resamples: options.resamples };

  const pairs: PairResult[] = [];
  for (let i = 0; i < returns.length; i++) {
    for (let j = i + 1; j < returns.length; j++) {
      const onProgress = options.onProgress ? (done: number, total: number) => options.onProgress!(`[${i}] − [${j}] bootstrap`, done, total) : undefined;
      const comparison = comparePair(returns[i], returns[j], { level: options.level, method: options.method, ...bootstrap, onProgress });
      pairs.push({
        first: i,
        second: j,
        ...comparison,
        adjustedPValue: comparison.pValue,
        probabilityOfImprovement: probabilityOfImprovementInterval(returns[i], returns[j], options.level, { resampling: 'paired' }),
      });
    }
  }
  const adjusted = holmAdjust(pairs.map((pair) => pair.pValue));
  pairs.forEach((pair, index) => (pair.adjustedPValue = adjusted[index]));

  const means = returns.map((sample) => summarize(sample).mean);
  const { rank } = rankByMean(means);
  const policies = means.map((mean, policy): PolicyStanding => {
    const standing: PolicyStanding = { policy, mean, rank: rank[policy] };
    if (options.interquartileMean) {
      const onProgress = options.onProgress ? (done: number, total: number) => options.onProgress!(`[${policy}] IQM bootstrap`, done, total) : undefined;
      standing.interquartileMean = interquartileMeanInterval([returns[policy]], options.level, { ...bootstrap, onProgress });
    }
    return standing;
  });
  return { policies, pairs };
}
