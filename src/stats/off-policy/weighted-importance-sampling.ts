import { discountedReturns, episodeCount, finalWeights, type Multiplicity, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * Weighted importance sampling (Precup, Sutton & Singh 2000, ICML, the WIS estimator):
 * Σ_i W_i G_i / Σ_i W_i. Biased (at n = 1 it is the logged return, so its expectation is the
 * behaviour's value) but consistent, and far less variable than ordinary IS. NaN when every
 * weight is zero: the log then says nothing about the target.
 */
export function weightedImportanceSampling(episodes: WeightedEpisodes, multiplicity: Multiplicity = null): number {
  const weights = finalWeights(episodes);
  const returns = discountedReturns(episodes);
  let numerator = 0;
  let denominator = 0;
  for (let i = 0; i < episodeCount(episodes); i++) {
    const c = multiplicity ? multiplicity[i] : 1;
    numerator += c * weights[i] * returns[i];
    denominator += c * weights[i];
  }
  return denominator > 0 ? numerator / denominator : Number.NaN;
}

/**
 * Empirical influence values of WIS, U_i = W_i (G_i − WIS)/W̄ (the derivative of the ratio
 * Σ W G / Σ W in episode i's weight; Davison & Hinkley 1997, Bootstrap Methods and their
 * Application, ch. 2, for a ratio of means; from memory): they give the BCa acceleration without a
 * jackknife loop.
 */
export function weightedImportanceSamplingInfluence(episodes: WeightedEpisodes): Float64Array {
  const weights = finalWeights(episodes);
  const returns = discountedReturns(episodes);
  const n = weights.length;
  const estimate = weightedImportanceSampling(episodes);
  const meanWeight = weights.reduce((a, b) => a + b, 0) / n;
  const out = new Float64Array(n);
  if (!(meanWeight > 0)) return out;
  for (let i = 0; i < n; i++) out[i] = (weights[i] * (returns[i] - estimate)) / meanWeight;
  return out;
}
