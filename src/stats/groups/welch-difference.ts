import tCdfImpl from '@stdlib/stats-base-dists-t-cdf';
import { tQuantile } from '../quantiles.js';
import { satterthwaite } from './satterthwaite.js';
import { groupInterval, type GroupInterval } from './group-interval.js';
import { episodeAverages, sampleCovariance, sharedEpisodeCovariance } from './shared-episode-covariance.js';
import type { VarianceComponents } from './variance-components.js';

export interface GroupDifference {
  /** Ȳ_A − Ȳ_B. */
  mean: number;
  standardError: number;
  /** Welch–Satterthwaite degrees of freedom of the member-mean variances. */
  degreesOfFreedom: number;
  interval: GroupInterval;
  tStatistic: number;
  /** Two-sided p-value of "the two methods have the same expected value". */
  pValue: number;
}

/**
 * Difference of two groups' means with Welch's interval on the member means (Welch 1947,
 * Biometrika 34:28–35; Satterthwaite 1946 for the degrees of freedom): members of different
 * groups are different training runs, so the seeds are not paired. Var̂ = s²_A/K_A + s²_B/K_B;
 * when every member ran on the same episodes (common random numbers) the episode noise the
 * members share adds c̄_A + c̄_B − 2 c̄_AB, c̄_AB = Ĉov(Z_A, Z_B)/n of the groups' episode
 * averages (docs/methods.md §15.3), which is near 0 when all members' noise is alike.
 */
export function welchDifference(
  a: VarianceComponents,
  b: VarianceComponents,
  level: number,
  shared: { a: readonly (Float64Array | number[])[]; b: readonly (Float64Array | number[])[] } | null = null,
): GroupDifference {
  const va = a.varianceOfMemberMeans / a.members;
  const vb = b.varianceOfMemberMeans / b.members;
  let correction = 0;
  if (shared) {
    const n = shared.a[0].length;
    const cross = sampleCovariance(episodeAverages(shared.a), episodeAverages(shared.b)) / n;
    correction = sharedEpisodeCovariance(shared.a) + sharedEpisodeCovariance(shared.b) - 2 * cross;
  }
  const variance = Math.max(0, va + vb + correction);
  const standardError = Math.sqrt(variance);
  const episodes = shared ? shared.a[0].length : Infinity;
  const degreesOfFreedom = satterthwaite([va, a.members - 1], [vb, b.members - 1], [Math.max(0, correction), episodes - 1]);
  const mean = a.grandMean - b.grandMean;
  const half = tQuantile(1 - (1 - level) / 2, degreesOfFreedom) * standardError;
  const tStatistic = standardError > 0 ? mean / standardError : mean === 0 ? Number.NaN : Math.sign(mean) * Infinity;
  const pValue = standardError > 0 ? Math.min(1, 2 * tCdfImpl(-Math.abs(tStatistic), degreesOfFreedom)) : mean === 0 ? 1 : 0;
  return { mean, standardError, degreesOfFreedom, interval: groupInterval('welch', level, mean - half, mean + half, degreesOfFreedom), tStatistic, pValue };
}
