import { episodeCount, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * Per-decision importance sampling (Precup, Sutton & Singh 2000, ICML, the per-decision IS
 * estimator): X_i = Σ_t γ^t ρ_{0:t} r_t, each reward weighted only by the ratios of the
 * decisions before it, which cannot have depended on later ones. Unbiased like ordinary IS,
 * and never more variable term by term. Returns the per-episode values; the estimate is their mean.
 */
export function perDecisionValues(episodes: WeightedEpisodes): Float64Array {
  const { episodeStart, reward, weight, discount } = episodes;
  const n = episodeCount(episodes);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = 0;
    let d = 1;
    for (let k = episodeStart[i]; k < episodeStart[i + 1]; k++) {
      x += d * weight[k] * reward[k];
      d *= discount;
    }
    out[i] = x;
  }
  return out;
}
