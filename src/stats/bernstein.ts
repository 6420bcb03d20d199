import { makeInterval, requireLevel, requireTwoEpisodes, type Interval } from './interval.js';
import { requireBounds, type ReturnBounds } from './return-bounds.js';
import type { ReturnSummary } from './summary.js';

/**
 * Empirical Bernstein half-width (Maurer & Pontil 2009, "Empirical Bernstein bounds and sample
 * variance penalization", COLT, Thm 4). For independent X_i ∈ [0, 1], n ≥ 2, with probability
 * ≥ 1 − δ: μ ≤ X̄ + √(2 s² ln(2/δ)/n) + 7 ln(2/δ)/(3(n − 1)), s² the unbiased sample variance.
 * Two-sided: a union bound over both tails replaces ln(2/δ) by ln(4/δ) in both terms. For
 * X_i ∈ [a, b], rescaling to [0, 1] and back gives √(2 s² L/n) + 7(b − a)L/(3(n − 1)), L = ln(4/δ).
 */
export function bernsteinHalfWidth(n: number, variance: number, range: number, delta: number): number {
  const logTerm = Math.log(4 / delta);
  return Math.sqrt((2 * variance * logTerm) / n) + (7 * range * logTerm) / (3 * (n - 1));
}

/**
 * Empirical Bernstein interval at `level` (δ = 1 − level): narrower than Hoeffding when the
 * returns vary little within their bounds. Intersected with [a, b], since μ lies there for
 * certain; `halfWidth` is then half the intersected width.
 */
export function bernsteinInterval(summary: ReturnSummary, level: number, bounds: ReturnBounds | null | undefined): Interval {
  requireLevel(level);
  requireTwoEpisodes('bernstein', summary);
  const [a, b] = requireBounds('bernstein', bounds, summary);
  const halfWidth = bernsteinHalfWidth(summary.n, summary.variance, b - a, 1 - level);
  return makeInterval('bernstein', level, Math.max(a, summary.mean - halfWidth), Math.min(b, summary.mean + halfWidth));
}
