import { InputError } from '../errors.js';
import { STREAM, streamFor } from '../engine/streams.js';
import { dkwEpsilon } from './dkw.js';
import { requireLevel } from './interval.js';
import { sortedQuantile } from './sample-quantile.js';

/** The lower-tail mean of the return with its intervals. */
export interface TailMean {
  /** Tail fraction α, e.g. 0.05: the mean of the worst 5% of returns. */
  readonly tail: number;
  readonly estimate: number;
  readonly level: number;
  /** Distribution-free, from the DKW band; null without return bounds. */
  readonly dkw: { readonly low: number; readonly high: number } | null;
  /** Percentile bootstrap: approximate, and short of its level when n·α is small. */
  readonly bootstrap: { readonly low: number; readonly high: number; readonly resamples: number } | null;
}

/**
 * ∫₀^u F_n⁻¹(v) dv for the empirical distribution of sorted values: the first ⌊nu⌋ values and
 * a fraction of the next, over n.
 */
export function quantileIntegral(sorted: Float64Array, u: number): number {
  const n = sorted.length;
  const whole = Math.min(n, Math.floor(n * u));
  let sum = 0;
  for (let i = 0; i < whole; i++) sum += sorted[i];
  if (whole < n) sum += (n * u - whole) * sorted[whole];
  return sum / n;
}

/**
 * Lower-tail CVaR_α of the return, (1/α)∫₀^α F⁻¹(u) du (Rockafellar & Uryasev 2000, "Optimization
 * of conditional value-at-risk", Journal of Risk 2(3):21–41), estimated by the same integral of
 * the empirical quantile function: (1/(nα))[Σ_{i≤k} G₍ᵢ₎ + (nα − k)G₍ₖ₊₁₎], k = ⌊nα⌋.
 */
export function tailMeanEstimate(sorted: Float64Array, tail: number): number {
  return quantileIntegral(sorted, tail) / tail;
}

/**
 * Distribution-free interval for CVaR_α of returns in [a, b], from the DKW band F_n ± ε
 * (docs/methods.md §14; the approach of Thomas & Learned-Miller 2019, "Concentration
 * inequalities for conditional value at risk", ICML, PMLR 97): CVaR is monotone under
 * first-order dominance, so the extreme distributions inside the band give the bounds. Moving
 * mass ε to a: low = [εa + ∫₀^{α−ε} F_n⁻¹]/α (a when α ≤ ε); moving mass ε to b:
 * high = [∫_ε^{min(α+ε, 1)} F_n⁻¹ + max(α + ε − 1, 0)·b]/α.
 */
export function tailMeanDkw(sorted: Float64Array, tail: number, level: number, bounds: readonly [number, number]): { low: number; high: number } {
  const [a, b] = bounds;
  const epsilon = dkwEpsilon(sorted.length, level);
  const low = tail > epsilon ? (epsilon * a + quantileIntegral(sorted, tail - epsilon)) / tail : a;
  const top = Math.min(tail + epsilon, 1);
  const high = (quantileIntegral(sorted, top) - quantileIntegral(sorted, Math.min(epsilon, 1)) + Math.max(tail + epsilon - 1, 0) * b) / tail;
  return { low: Math.max(a, low), high: Math.min(b, high) };
}

/**
 * Percentile bootstrap of CVaR_α (Efron & Tibshirani 1993, ch. 13). A resample's tail needs only
 * its ⌈nα⌉ + 1 smallest draws: the smallest order statistics of n uniforms come one after another
 * from exponential spacings, U₍ⱼ₎ = 1 − exp(−Σ_{i≤j} Eᵢ/(n − i + 1)) (Rényi 1953, "On the theory of
 * order statistics", Acta Math. Acad. Sci. Hungar. 4:191–231), and the uniform U picks the sorted
 * return of rank ⌈nU⌉, so a resample costs O(nα) instead of O(n).
 */
export function tailMeanBootstrap(sorted: Float64Array, tail: number, level: number, seed: number, resamples = 2000): { low: number; high: number; resamples: number } {
  const n = sorted.length;
  const need = Math.min(n, Math.floor(n * tail) + 1);
  const rng = streamFor(seed, STREAM.BOOTSTRAP, 0x7a11);
  const estimates = new Float64Array(resamples);
  const drawn = new Float64Array(need);
  for (let r = 0; r < resamples; r++) {
    let cumulative = 0;
    for (let j = 0; j < need; j++) {
      cumulative += -Math.log(1 - rng.uniform()) / (n - j);
      const u = -Math.expm1(-cumulative);
      drawn[j] = sorted[Math.min(n - 1, Math.floor(n * u))];
    }
    estimates[r] = tailFromSmallest(drawn, n, tail);
  }
  estimates.sort();
  const alpha = 1 - level;
  return { low: sortedQuantile(estimates, alpha / 2), high: sortedQuantile(estimates, 1 - alpha / 2), resamples };
}

/** CVaR_α of an n-long sample from its smallest ⌊nα⌋ + 1 values, ascending (as tailMeanEstimate reads them). */
function tailFromSmallest(smallest: Float64Array, n: number, tail: number): number {
  const whole = Math.min(n, Math.floor(n * tail));
  let sum = 0;
  for (let i = 0; i < whole; i++) sum += smallest[i];
  if (whole < n) sum += (n * tail - whole) * smallest[whole];
  return sum / n / tail;
}

/** Both intervals of the tail mean; the DKW one needs bounds. */
export function tailMean(sorted: Float64Array, tail: number, level: number, bounds: readonly [number, number] | null, seed: number): TailMean {
  requireLevel(level);
  if (!(tail > 0 && tail < 1)) throw new InputError('--tail', `must be strictly between 0 and 1, e.g. 0.05 (got ${tail})`);
  if (sorted.length < 2) throw new InputError('--tail', `needs at least 2 episodes (got ${sorted.length})`);
  return {
    tail,
    estimate: tailMeanEstimate(sorted, tail),
    level,
    dkw: bounds ? tailMeanDkw(sorted, tail, level, bounds) : null,
    bootstrap: tailMeanBootstrap(sorted, tail, level, seed),
  };
}
