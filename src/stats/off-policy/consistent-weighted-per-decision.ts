import { StepRatioSums } from './step-ratio-sums.js';
import { episodeCount, longestEpisode, stepNormalisers, type Multiplicity, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * Consistent weighted per-decision importance sampling (Thomas 2015, PhD thesis "Safe
 * Reinforcement Learning", University of Massachusetts Amherst, the CWPDIS estimator):
 * Σ_t γ^t (Σ_i ρ^{(i)}_{0:t} r^{(i)}_t)/(Σ_i ρ^{(i)}_{0:t}). Each step's rewards are
 * normalised by that step's weights, which keeps it consistent where the weighted
 * per-decision form of Precup et al. (2000) is not. Biased at small n. Finished episodes
 * count in later normalisers with their final weight (absorbed, reward 0). A step whose
 * normaliser is 0 contributes 0.
 */
export function consistentWeightedPerDecision(episodes: WeightedEpisodes, multiplicity: Multiplicity = null): number {
  return consistentWeightedPerDecisionSums(episodes).estimate(multiplicity);
}

/** The estimator as reusable sums, for many bootstrap replicates: A_t = ρ_{0:t} r_t, no baseline. */
export function consistentWeightedPerDecisionSums(episodes: WeightedEpisodes): StepRatioSums {
  const residual = new Float64Array(episodes.reward.length);
  for (let k = 0; k < residual.length; k++) residual[k] = episodes.weight[k] * episodes.reward[k];
  return new StepRatioSums(episodes, residual, null);
}

/** N_t = Σ_i ρ^{(i)}_{0:t} r^{(i)}_t. */
function stepNumerators(episodes: WeightedEpisodes, longest: number): Float64Array {
  const { episodeStart, reward, weight } = episodes;
  const out = new Float64Array(longest);
  for (let i = 0; i < episodeCount(episodes); i++) {
    const first = episodeStart[i];
    for (let k = first; k < episodeStart[i + 1]; k++) out[k - first] += weight[k] * reward[k];
  }
  return out;
}

/**
 * Empirical influence values U_i = Σ_t γ^t (ρ_it r_it − R_t ρ_it)/D̄_t, R_t = N_t/D_t, D̄_t =
 * D_t/n (the derivative of each step's ratio of sums; Davison & Hinkley 1997, ch. 2; from memory). A finished
 * episode's frozen weight enters every later step: those terms are suffix sums, so the cost
 * is one pass over the steps.
 */
export function consistentWeightedPerDecisionInfluence(episodes: WeightedEpisodes): Float64Array {
  const { episodeStart, reward, weight, discount } = episodes;
  const n = episodeCount(episodes);
  const longest = longestEpisode(episodes);
  const numerators = stepNumerators(episodes, longest);
  const normalisers = stepNormalisers(episodes, null, longest);
  const factor = new Float64Array(longest); // γ^t / D̄_t, or 0
  const ratio = new Float64Array(longest);
  let d = 1;
  for (let t = 0; t < longest; t++) {
    if (normalisers[t] > 0) {
      factor[t] = (d * n) / normalisers[t];
      ratio[t] = numerators[t] / normalisers[t];
    }
    d *= discount;
  }
  const tail = new Float64Array(longest + 1); // Σ_{t ≥ T} factor_t R_t
  for (let t = longest - 1; t >= 0; t--) tail[t] = tail[t + 1] + factor[t] * ratio[t];
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const first = episodeStart[i];
    const length = episodeStart[i + 1] - first;
    let u = 0;
    for (let t = 0; t < length; t++) u += factor[t] * weight[first + t] * (reward[first + t] - ratio[t]);
    u -= weight[first + length - 1] * tail[length];
    out[i] = u;
  }
  return out;
}
