import { STREAM, streamFor } from '../../engine/streams.js';
import { DEFAULT_RESAMPLES } from '../bootstrap-resample.js';
import { interquartileMeanInterval } from '../interquartile-mean-interval.js';
import type { Interval } from '../interval.js';
import { requireLevel } from '../interval.js';
import { tQuantile } from '../quantiles.js';
import { sortedQuantile } from '../sample-quantile.js';
import { summarize } from '../summary.js';
import { groupInterval, type GroupInterval } from './group-interval.js';
import { satterthwaite } from './satterthwaite.js';
import { sharedEpisodeCovariance } from './shared-episode-covariance.js';
import { varianceComponents, type VarianceComponents } from './variance-components.js';

/** From this many members on, the seed-level bootstrap is reported beside the t interval. */
export const SEED_BOOTSTRAP_FROM = 20;

/** Where the group mean's uncertainty comes from, and what would narrow it. */
export type GroupAdvice = 'more-seeds' | 'more-episodes' | 'both';

export interface GroupMean {
  components: VarianceComponents;
  /** Ȳ, the mean of the member means: the training method's expected value. */
  mean: number;
  /** √Var̂(Ȳ), Var̂(Ȳ) = s²(Ȳ_k)/K + c̄. */
  standardError: number;
  /** Ȳ ± t_ν · standardError, ν = K − 1 without shared noise (Satterthwaite's ν with it). */
  interval: GroupInterval;
  /** The seed-level (cluster) bootstrap percentile interval; null below {@link SEED_BOOTSTRAP_FROM} members. */
  seedBootstrap: GroupInterval | null;
  /** The interquartile mean of the member means with its bootstrap over members. */
  interquartileMean: { estimate: number; interval: Interval };
  /** The interval that treats all Σ n_k episodes as independent: wrong, shown for contrast. */
  naive: GroupInterval;
  naiveStandardError: number;
  /** σ̂²_b/K and the episodes' part of Var̂(Ȳ). */
  seedVariance: number;
  episodeVariance: number;
  /** episodeVariance / (seedVariance + episodeVariance): the share of Var̂(Ȳ) due to episodes. */
  episodeShare: number;
  /** t_{K−1}·σ̂_b/√K: the half-width left with unlimited episodes per member. */
  halfWidthWithUnlimitedEpisodes: number;
  advice: GroupAdvice;
}

export interface GroupMeanOptions {
  level: number;
  /** Members ran on the same episodes (common random numbers): add their shared noise (default false). */
  sharedEpisodes?: boolean;
  /** Bootstrap seed (the run seed) and resamples. */
  seed?: number;
  resamples?: number;
}

/** Below this share of the variance, episodes are not worth buying; above 1 − it, seeds are not. */
const SHARE_CUT = 0.2;

/**
 * The value of a training method from K trained members (Cochran 1977, ch. 10, two-stage
 * sampling): Ȳ = mean of the member means, with Ȳ ± t_{K−1} s(Ȳ_k)/√K, which is unbiased for
 * Var(Ȳ) = σ²_b/K + (1/K²) Σ σ²_w,k/n_k whatever the n_k when members have independent
 * episodes. Under common random numbers the members' episode means are correlated and the
 * variance gains their mean covariance c̄, with Satterthwaite's degrees of freedom for the
 * sum (docs/methods.md §15.3). For K ≥ 20 also the
 * seed-level bootstrap (Davison & Hinkley 1997, Bootstrap Methods and their Application,
 * §3.8: resample members, keep each member's episodes whole), and the IQM of the member
 * means with its bootstrap over members (Agarwal et al. 2021). The episode share of the
 * variance says whether more episodes or more seeds would narrow the interval.
 */
export function groupMean(members: readonly (Float64Array | number[])[], options: GroupMeanOptions): GroupMean {
  requireLevel(options.level);
  const shared = options.sharedEpisodes ? sharedEpisodeCovariance(members) : 0;
  const components = varianceComponents(members, shared);
  const k = components.members;
  const level = options.level;
  const tK = tQuantile(1 - (1 - level) / 2, k - 1);
  const spread = components.varianceOfMemberMeans / k;
  const variance = Math.max(0, spread + shared);
  const standardError = Math.sqrt(variance);
  const mean = components.grandMean;
  const df = satterthwaite([spread, k - 1], [Math.max(0, shared), Math.min(...components.episodes) - 1]);
  const tDf = tQuantile(1 - (1 - level) / 2, df);
  const interval = groupInterval('seed-t', level, mean - tDf * standardError, mean + tDf * standardError, df);

  let episodeSum = 0;
  for (let i = 0; i < k; i++) episodeSum += components.memberVariances[i] / components.episodes[i];
  const episodeVariance = Math.max(0, episodeSum / (k * k) + ((k - 1) * shared) / k);
  const seedVariance = components.betweenVariance / k;
  const episodeShare = seedVariance + episodeVariance > 0 ? episodeVariance / (seedVariance + episodeVariance) : 1;

  const pooled = new Float64Array(members.reduce((n, m) => n + m.length, 0));
  let at = 0;
  for (const m of members) {
    pooled.set(m, at);
    at += m.length;
  }
  const all = summarize(pooled);
  const z = tQuantile(1 - (1 - level) / 2, all.n - 1);
  const naive = groupInterval('naive-pooled-t', level, all.mean - z * all.stderr, all.mean + z * all.stderr, all.n - 1);

  const bootstrap = { seed: options.seed ?? 0, resamples: options.resamples ?? DEFAULT_RESAMPLES };
  return {
    components,
    mean,
    standardError,
    interval,
    seedBootstrap: k >= SEED_BOOTSTRAP_FROM ? seedBootstrapInterval(components.memberMeans, variance, level, bootstrap) : null,
    interquartileMean: interquartileMeanInterval([components.memberMeans], level, bootstrap),
    naive,
    naiveStandardError: all.stderr,
    seedVariance,
    episodeVariance,
    episodeShare,
    halfWidthWithUnlimitedEpisodes: tK * Math.sqrt(components.betweenVariance / k),
    advice: episodeShare < SHARE_CUT ? 'more-seeds' : episodeShare > 1 - SHARE_CUT ? 'more-episodes' : 'both',
  };
}

/**
 * Percentile interval of the mean over members resampled with replacement, each member's
 * episodes kept whole (Davison & Hinkley 1997, §3.8). The resampled deviations are scaled by
 * √(Var̂(Ȳ)/(s²(Ȳ_k)/K)) so that the episode noise the members share under common random
 * numbers, which resampling members cannot see, is counted as in the t interval (our
 * adjustment, docs/methods.md §15.4; a factor of 1 for independent members).
 */
function seedBootstrapInterval(memberMeans: Float64Array, variance: number, level: number, options: { seed: number; resamples: number }): GroupInterval {
  const k = memberMeans.length;
  const s = summarize(memberMeans);
  const rng = streamFor(options.seed, STREAM.BOOTSTRAP);
  const deviations = new Float64Array(options.resamples);
  for (let b = 0; b < options.resamples; b++) {
    let sum = 0;
    for (let i = 0; i < k; i++) sum += memberMeans[rng.integer(k)];
    deviations[b] = sum / k - s.mean;
  }
  deviations.sort();
  const plain = s.variance / k;
  const scale = plain > 0 ? Math.sqrt(Math.max(variance, plain) / plain) : 1;
  const alpha = 1 - level;
  return groupInterval(
    'seed-bootstrap',
    level,
    s.mean + scale * sortedQuantile(deviations, alpha / 2),
    s.mean + scale * sortedQuantile(deviations, 1 - alpha / 2),
    null,
  );
}
