import type { StepModelValues } from './doubly-robust.js';
import { StepRatioSums } from './step-ratio-sums.js';
import { episodeCount, longestEpisode, multiplicitySum, stepNormalisers, type Multiplicity, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * Weighted doubly robust estimator (Thomas & Brunskill 2016, ICML, "Data-efficient off-policy
 * policy evaluation for reinforcement learning"): the doubly robust form with each
 * step's ratios normalised over the episodes, w_t = ρ_{0:t}/Σ_j ρ^{(j)}_{0:t}, w_{−1} = 1/n:
 * Σ_t γ^t [Σ_i w_t (r_t − Q̂_t) + Σ_i w_{t−1} V̂_t]. Biased at small n, consistent, and usually
 * the least variable. Finished episodes keep their final weight in later normalisers.
 */
export function weightedDoublyRobust(episodes: WeightedEpisodes, model: StepModelValues, multiplicity: Multiplicity = null): number {
  return weightedDoublyRobustSums(episodes, model).estimate(multiplicity);
}

/** The estimator as reusable sums: A_t = ρ_{0:t}(r_t − Q̂_t), B_t = ρ_{0:t−1} V̂_t. */
export function weightedDoublyRobustSums(episodes: WeightedEpisodes, model: StepModelValues): StepRatioSums {
  const { episodeStart, reward, weight } = episodes;
  const residual = new Float64Array(reward.length);
  const baseline = new Float64Array(reward.length);
  for (let i = 0; i < episodeCount(episodes); i++) {
    let previous = 1;
    for (let k = episodeStart[i]; k < episodeStart[i + 1]; k++) {
      residual[k] = weight[k] * (reward[k] - model.q[k]);
      baseline[k] = previous * model.v[k];
      previous = weight[k];
    }
  }
  return new StepRatioSums(episodes, residual, baseline);
}

interface WdrParts {
  longest: number;
  count: number;
  /** Σ_i c ρ_t (r_t − q_t) per t. */
  residual: Float64Array;
  /** Σ_i c ρ_{t−1} v_t per t. */
  baseline: Float64Array;
  normaliser: Float64Array;
}

function wdrParts(episodes: WeightedEpisodes, model: StepModelValues, multiplicity: Multiplicity): WdrParts {
  const { episodeStart, reward, weight } = episodes;
  const n = episodeCount(episodes);
  const longest = longestEpisode(episodes);
  const residual = new Float64Array(longest);
  const baseline = new Float64Array(longest);
  for (let i = 0; i < n; i++) {
    const c = multiplicity ? multiplicity[i] : 1;
    if (c === 0) continue;
    const first = episodeStart[i];
    let previous = 1;
    for (let k = first; k < episodeStart[i + 1]; k++) {
      residual[k - first] += c * weight[k] * (reward[k] - model.q[k]);
      baseline[k - first] += c * previous * model.v[k];
      previous = weight[k];
    }
  }
  return { longest, count: multiplicitySum(n, multiplicity), residual, baseline, normaliser: stepNormalisers(episodes, multiplicity, longest) };
}

/**
 * Empirical influence values of WDR (each step's two ratios of sums differentiated in episode
 * i's weight; Davison & Hinkley 1997, ch. 2; from memory), with a finished episode's frozen weight handled
 * by suffix sums: one pass over the steps. They give the BCa acceleration.
 */
export function weightedDoublyRobustInfluence(episodes: WeightedEpisodes, model: StepModelValues): Float64Array {
  const { episodeStart, reward, weight, discount } = episodes;
  const n = episodeCount(episodes);
  const parts = wdrParts(episodes, model, null);
  const { longest, normaliser } = parts;
  const residualFactor = new Float64Array(longest);
  const residualRatio = new Float64Array(longest);
  const baselineFactor = new Float64Array(longest);
  const baselineRatio = new Float64Array(longest);
  let d = 1;
  for (let t = 0; t < longest; t++) {
    if (normaliser[t] > 0) {
      residualFactor[t] = (d * n) / normaliser[t];
      residualRatio[t] = parts.residual[t] / normaliser[t];
    }
    const previous = t === 0 ? n : normaliser[t - 1];
    if (previous > 0) {
      baselineFactor[t] = (d * n) / previous;
      baselineRatio[t] = parts.baseline[t] / previous;
    }
    d *= discount;
  }
  const tail = new Float64Array(longest + 1);
  for (let t = longest - 1; t >= 0; t--) tail[t] = tail[t + 1] + residualFactor[t] * residualRatio[t] + baselineFactor[t] * baselineRatio[t];
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const first = episodeStart[i];
    const length = episodeStart[i + 1] - first;
    let u = 0;
    let previous = 1;
    for (let t = 0; t < length; t++) {
      const k = first + t;
      u += residualFactor[t] * weight[k] * (reward[k] - model.q[k] - residualRatio[t]);
      u += baselineFactor[t] * previous * (model.v[k] - baselineRatio[t]);
      previous = weight[k];
    }
    u -= weight[first + length - 1] * tail[length];
    out[i] = u;
  }
  return out;
}
