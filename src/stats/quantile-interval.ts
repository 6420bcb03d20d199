import { InputError } from '../errors.js';
import { requireLevel } from './interval.js';
import { binomialCdf } from './quantiles.js';
import { sortedQuantile } from './sample-quantile.js';

/** A distribution-free interval for one quantile of the return. */
export interface QuantileInterval {
  /** The quantile's level p, e.g. 0.05. */
  readonly p: number;
  /** The sample p-quantile (Hyndman & Fan definition 7). */
  readonly estimate: number;
  readonly level: number;
  readonly low: number;
  readonly high: number;
  /** Ranks (1-based) of the order statistics used; 0 and n + 1 mean the return bounds. */
  readonly lowRank: number;
  readonly highRank: number;
  /** P(X₍l₎ ≤ ξ_p ≤ X₍u₎) for a continuous distribution: at least `level`; discrete returns only add to it. */
  readonly coverage: number;
}

/**
 * The binomial (order-statistic) interval for the p-quantile ξ_p (Hahn & Meeker 1991,
 * Statistical Intervals, ch. 5; Meeker, Hahn & Escobar 2017, ch. 5): with B ~ Binomial(n, p),
 * P(X₍l₎ ≤ ξ_p ≤ X₍u₎) ≥ P(l ≤ B ≤ u − 1) = F_B(u − 1) − F_B(l − 1), with equality for a
 * continuous distribution. l is the largest rank with F_B(l − 1) ≤ α/2 and u the smallest with
 * 1 − F_B(u − 1) ≤ α/2; when none exists the side falls back to the return bound (±∞ without
 * bounds). For returns with ties the coverage is at least the reported one: conservative, never
 * interpolated between tied values.
 */
export function quantileInterval(sorted: Float64Array, p: number, level: number, bounds: readonly [number, number] | null): QuantileInterval {
  requireLevel(level);
  if (!(p > 0 && p < 1)) throw new InputError('--quantiles', `each level must be strictly between 0 and 1 (got ${p})`);
  const n = sorted.length;
  if (n < 1) throw new InputError('--quantiles', 'needs at least one episode');
  const half = (1 - level) / 2;
  // F_B(k − 1) increases in k, so both ranks are found by bisection.
  const lowRank = lastRank(0, n, (k) => binomialCdf(k - 1, n, p) <= half);
  const highRank = firstRank(1, n + 1, (k) => 1 - binomialCdf(k - 1, n, p) <= half);
  const coverage = binomialCdf(highRank - 1, n, p) - binomialCdf(lowRank - 1, n, p);
  const low = lowRank >= 1 ? sorted[lowRank - 1] : bounds ? bounds[0] : -Infinity;
  const high = highRank <= n ? sorted[highRank - 1] : bounds ? bounds[1] : Infinity;
  return { p, estimate: sortedQuantile(sorted, p), level, low, high, lowRank, highRank, coverage };
}

/**
 * Wilks's tolerance-limit confidence (Wilks 1941, Annals of Mathematical Statistics 12:91–96):
 * the probability that the largest of n returns is at or above the β-quantile, 1 − β^n (0.95151
 * for n = 59, β = 0.95: the "59-run rule"); by symmetry, that the smallest is at or below the
 * (1 − β)-quantile.
 */
export function wilksConfidence(episodes: number, beta: number): number {
  return 1 - Math.pow(beta, episodes);
}

/** The largest k in [from, to] with test(k), where test holds up to some k and fails after; `from` when it never holds above it. */
function lastRank(from: number, to: number, test: (k: number) => boolean): number {
  let low = from; // test(from) is taken to hold (rank 0: the bound)
  let high = to + 1;
  while (high - low > 1) {
    const mid = (low + high) >> 1;
    if (test(mid)) low = mid;
    else high = mid;
  }
  return low;
}

/** The smallest k in [from, to] with test(k), where test fails up to some k and holds after; `to` when only it holds. */
function firstRank(from: number, to: number, test: (k: number) => boolean): number {
  let low = from - 1;
  let high = to; // test(to) is taken to hold (rank n + 1: the bound)
  while (high - low > 1) {
    const mid = (low + high) >> 1;
    if (test(mid)) high = mid;
    else low = mid;
  }
  return high;
}
