import { episodeCount, longestEpisode, type Multiplicity, type WeightedEpisodes } from './weighted-episodes.js';

/**
 * The shared shape of the per-step normalised estimators (CWPDIS, WDR):
 *   Σ_t γ^t [ (Σ_i c_i A^{(i)}_t)/D_t + (Σ_i c_i B^{(i)}_t)/D_{t−1} ],
 * with D_t = Σ_i c_i ρ^{(i)}_{0:min(t, T_i−1)} (finished episodes frozen), D_{−1} = Σ_i c_i, and
 * A, B given per logged step. A step whose normaliser is 0 contributes 0. One pass over the
 * steps, skipping episodes a bootstrap replicate leaves out; the scratch arrays are reused.
 */
export class StepRatioSums {
  private readonly longest: number;
  private readonly numerator: Float64Array;
  private readonly baselineSum: Float64Array;
  private readonly normaliser: Float64Array;
  private readonly frozen: Float64Array;

  constructor(
    private readonly episodes: WeightedEpisodes,
    private readonly residual: Float64Array,
    private readonly baseline: Float64Array | null,
  ) {
    this.longest = longestEpisode(episodes);
    this.numerator = new Float64Array(this.longest);
    this.baselineSum = new Float64Array(this.longest);
    this.normaliser = new Float64Array(this.longest);
    this.frozen = new Float64Array(this.longest + 1);
  }

  estimate(multiplicity: Multiplicity = null): number {
    const { episodeStart, weight, discount } = this.episodes;
    const { residual, baseline, numerator, baselineSum, normaliser, frozen, longest } = this;
    const n = episodeCount(this.episodes);
    numerator.fill(0);
    baselineSum.fill(0);
    normaliser.fill(0);
    frozen.fill(0);
    let total = 0;
    for (let i = 0; i < n; i++) {
      const c = multiplicity ? multiplicity[i] : 1;
      if (c === 0) continue;
      total += c;
      const first = episodeStart[i];
      const end = episodeStart[i + 1];
      for (let k = first; k < end; k++) {
        const t = k - first;
        numerator[t] += c * residual[k];
        normaliser[t] += c * weight[k];
      }
      if (baseline) for (let k = first; k < end; k++) baselineSum[k - first] += c * baseline[k];
      frozen[end - first] += c * weight[end - 1];
    }
    let estimate = 0;
    let carried = 0;
    let previous = total;
    let d = 1;
    for (let t = 0; t < longest; t++) {
      carried += frozen[t];
      const normalisedAt = normaliser[t] + carried;
      if (normalisedAt > 0) estimate += (d * numerator[t]) / normalisedAt;
      if (baseline && previous > 0) estimate += (d * baselineSum[t]) / previous;
      previous = normalisedAt;
      d *= discount;
    }
    return estimate;
  }
}
