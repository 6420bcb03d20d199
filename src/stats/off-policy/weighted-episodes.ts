/**
 * Logged episodes with their importance ratios, in the flat form every off-policy estimator
 * reads: steps of episode i are `episodeStart[i] .. episodeStart[i + 1]`, and `weight[k]` is
 * the cumulative ratio ρ_{0:t} = Π_{j≤t} π(a_j|s_j)/μ(a_j|s_j) of step k, its episode's t.
 *
 * Episodes of unequal length are treated as absorbed after their last step (reward 0, ratio
 * 1 from then on), so the per-step normalisers of the weighted per-decision estimators count
 * a finished episode with its final weight frozen (Thomas 2015, PhD thesis, ch. 3).
 */
export interface WeightedEpisodes {
  readonly episodeStart: Int32Array;
  readonly reward: Float64Array;
  readonly weight: Float64Array;
  readonly discount: number;
}

/**
 * How often each episode counts: all ones for the sample itself, resample counts for a
 * bootstrap replicate (so no replicate copies any step).
 */
export type Multiplicity = Float64Array | null;

export function episodeCount(episodes: WeightedEpisodes): number {
  return episodes.episodeStart.length - 1;
}

/** The most steps of any episode. */
export function longestEpisode(episodes: WeightedEpisodes): number {
  const start = episodes.episodeStart;
  let longest = 0;
  for (let i = 0; i + 1 < start.length; i++) longest = Math.max(longest, start[i + 1] - start[i]);
  return longest;
}

/** Cumulative ratios from per-step ratios, summed in log space so long episodes neither overflow nor underflow early. */
export function cumulativeWeights(episodeStart: Int32Array, targetProb: Float64Array, behaviourProb: Float64Array): Float64Array {
  const weight = new Float64Array(targetProb.length);
  for (let i = 0; i + 1 < episodeStart.length; i++) {
    let logWeight = 0;
    for (let k = episodeStart[i]; k < episodeStart[i + 1]; k++) {
      logWeight += Math.log(targetProb[k]) - Math.log(behaviourProb[k]);
      weight[k] = Math.exp(logWeight);
    }
  }
  return weight;
}

/** W_i = ρ_{0:T_i−1}, each episode's final weight. */
export function finalWeights(episodes: WeightedEpisodes): Float64Array {
  const n = episodeCount(episodes);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = episodes.weight[episodes.episodeStart[i + 1] - 1];
  return out;
}

/** G_i = Σ_t γ^t r_t, each episode's discounted return. */
export function discountedReturns(episodes: WeightedEpisodes): Float64Array {
  const { episodeStart, reward, discount } = episodes;
  const n = episodeCount(episodes);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let g = 0;
    let d = 1;
    for (let k = episodeStart[i]; k < episodeStart[i + 1]; k++) {
      g += d * reward[k];
      d *= discount;
    }
    out[i] = g;
  }
  return out;
}

/**
 * D_t = Σ_i c_i ρ^{(i)}_{0:min(t, T_i−1)} for t = 0 .. longest − 1: the normaliser of step t
 * with finished episodes' weights frozen.
 */
export function stepNormalisers(episodes: WeightedEpisodes, multiplicity: Multiplicity, longest: number): Float64Array {
  const { episodeStart, weight } = episodes;
  const n = episodeCount(episodes);
  const normaliser = new Float64Array(longest);
  const frozen = new Float64Array(longest + 1); // frozen[T]: weight entering every t ≥ T
  for (let i = 0; i < n; i++) {
    const c = multiplicity ? multiplicity[i] : 1;
    if (c === 0) continue;
    const first = episodeStart[i];
    const length = episodeStart[i + 1] - first;
    for (let t = 0; t < length; t++) normaliser[t] += c * weight[first + t];
    frozen[length] += c * weight[first + length - 1];
  }
  let carried = 0;
  for (let t = 0; t < longest; t++) {
    carried += frozen[t];
    normaliser[t] += carried;
  }
  return normaliser;
}

export function multiplicitySum(n: number, multiplicity: Multiplicity): number {
  if (!multiplicity) return n;
  let total = 0;
  for (let i = 0; i < n; i++) total += multiplicity[i];
  return total;
}
