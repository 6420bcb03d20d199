import { InputError } from '../../errors.js';
import { summarize } from '../summary.js';

/** The one-way random-effects table of a group: K members (training seeds), n_k episodes each. */
export interface VarianceComponents {
  /** K, the number of members. */
  members: number;
  /** n_k of each member. */
  episodes: number[];
  /** Ȳ_k and s²_k (divisor n_k − 1) of each member. */
  memberMeans: Float64Array;
  memberVariances: Float64Array;
  /** Ȳ = (1/K) Σ Ȳ_k: every member weighs the same, whatever its n_k. */
  grandMean: number;
  /** s²(Ȳ_1 … Ȳ_K), divisor K − 1. */
  varianceOfMemberMeans: number;
  /** MSB = n Σ (Ȳ_k − Ȳ)²/(K − 1); null when the n_k differ. */
  meanSquareBetween: number | null;
  /** MSW = Σ (n_k − 1) s²_k / Σ (n_k − 1): the pooled episode variance, σ̂²_w. */
  meanSquareWithin: number;
  /** σ̂²_b ≥ 0, the variance of the members' true values (seed variability). */
  betweenVariance: number;
  /** σ̂²_w = MSW (episode variability within a member). */
  withinVariance: number;
  /** σ̂²_b/(σ̂²_b + σ̂²_w); 0 when both are 0. */
  intraclassCorrelation: number;
  /** 1 + (n̄ − 1)·ICC, n̄ the mean n_k: how much the naive pooled variance understates. */
  designEffect: number;
  /** The mean covariance of two members' episode means that `shared` passed in (0 without). */
  sharedCovariance: number;
}

/**
 * Variance components of a two-level sample (Cochran 1977, Sampling Techniques, 3rd ed.,
 * ch. 10, two-stage sampling with equal first-stage units; the one-way random-effects
 * ANOVA): Y_kj = μ + b_k + e_kj, Var b = σ²_b, Var e = σ²_w. Balanced, σ̂²_b = (MSB − MSW)/n.
 * With unequal n_k the same estimate is written σ̂²_b = s²(Ȳ_k) − (1/K) Σ s²_k/n_k, unbiased
 * because E s²(Ȳ_k) = σ²_b + (1/K) Σ σ²_w/n_k for independent episodes; it equals the
 * balanced form when the n_k agree. Members run on common random numbers have correlated
 * episode means, which lowers E s²(Ȳ_k) by their mean covariance c̄; `shared` adds it back
 * (docs/methods.md §15.2–15.3). σ̂²_b is cut at 0, as is usual.
 */
export function varianceComponents(members: readonly (Float64Array | number[])[], shared = 0): VarianceComponents {
  const k = members.length;
  if (k < 2) throw new InputError('group', `a group needs at least 2 members to separate seed from episode variability (got ${k})`);
  const memberMeans = new Float64Array(k);
  const memberVariances = new Float64Array(k);
  const episodes: number[] = [];
  let pooledSquares = 0;
  let pooledDf = 0;
  let episodeVarianceOfMean = 0;
  members.forEach((member, i) => {
    if (member.length < 2) throw new InputError('group', `member ${i} has ${member.length} episode(s); each needs at least 2`);
    const s = summarize(member);
    memberMeans[i] = s.mean;
    memberVariances[i] = s.variance;
    episodes.push(s.n);
    pooledSquares += (s.n - 1) * s.variance;
    pooledDf += s.n - 1;
    episodeVarianceOfMean += s.variance / s.n;
  });
  const means = summarize(memberMeans);
  const balanced = episodes.every((n) => n === episodes[0]);
  const meanSquareWithin = pooledSquares / pooledDf;
  const betweenVariance = Math.max(0, means.variance - episodeVarianceOfMean / k + shared);
  const total = betweenVariance + meanSquareWithin;
  const intraclassCorrelation = total > 0 ? betweenVariance / total : 0;
  const meanEpisodes = episodes.reduce((a, b) => a + b, 0) / k;
  return {
    members: k,
    episodes,
    memberMeans,
    memberVariances,
    grandMean: means.mean,
    varianceOfMemberMeans: means.variance,
    meanSquareBetween: balanced ? episodes[0] * means.variance : null,
    meanSquareWithin,
    betweenVariance,
    withinVariance: meanSquareWithin,
    intraclassCorrelation,
    designEffect: 1 + (meanEpisodes - 1) * intraclassCorrelation,
    sharedCovariance: shared,
  };
}
