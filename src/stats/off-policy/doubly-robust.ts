import { episodeCount, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * A model's values along the logged steps: `q[k]` = Q̂_t(s_t, a_t) and `v[k]` = V̂_t(s_t) =
 * Σ_a π(a|s_t) Q̂_t(s_t, a) for step k at its episode's time t.
 */
export interface StepModelValues {
  readonly q: Float64Array;
  readonly v: Float64Array;
}

/**
 * The doubly robust estimator (Jiang & Li 2016, ICML, "Doubly robust off-policy value
 * evaluation for reinforcement learning", its recursive form unrolled): per episode
 * X_i = Σ_t γ^t [ρ_{0:t}(r_t − Q̂_t(s_t,a_t)) + ρ_{0:t−1} V̂_t(s_t)], ρ_{0:−1} = 1. Unbiased for
 * any Q̂ that does not depend on the episode it is applied to (fixed, or fitted on other
 * folds); with Q̂ = 0 it is per-decision IS, and the closer Q̂ is to Q^π the less it varies.
 * Returns the per-episode values; the estimate is their mean.
 */
export function doublyRobustValues(episodes: WeightedEpisodes, model: StepModelValues): Float64Array {
  const { episodeStart, reward, weight, discount } = episodes;
  const n = episodeCount(episodes);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = 0;
    let d = 1;
    let previous = 1;
    for (let k = episodeStart[i]; k < episodeStart[i + 1]; k++) {
      x += d * (weight[k] * (reward[k] - model.q[k]) + previous * model.v[k]);
      previous = weight[k];
      d *= discount;
    }
    out[i] = x;
  }
  return out;
}
