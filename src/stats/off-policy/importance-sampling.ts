import { discountedReturns, finalWeights, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * Ordinary importance sampling (Precup, Sutton & Singh 2000, ICML, "Eligibility traces for
 * off-policy policy evaluation", the IS estimator): the mean of X_i = W_i G_i, each episode's
 * return times the product of its ratios. Unbiased for the target's value when the target
 * takes no action the behaviour could not; its variance can grow exponentially with the
 * horizon. Returns the per-episode values, whose mean is the estimate.
 */
export function importanceSamplingValues(episodes: WeightedEpisodes): Float64Array {
  const weights = finalWeights(episodes);
  const returns = discountedReturns(episodes);
  for (let i = 0; i < weights.length; i++) returns[i] *= weights[i];
  return returns;
}
