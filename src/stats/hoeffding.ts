import { makeInterval, requireLevel, requireTwoEpisodes, type Interval } from './interval.js';
import { requireBounds, type ReturnBounds } from './return-bounds.js';
import type { ReturnSummary } from './summary.js';

/**
 * Hoeffding (1963, "Probability inequalities for sums of bounded random variables", JASA
 * 58:13–30, Thm 2): for independent X_i ∈ [a, b], P(|X̄ − μ| ≥ ε) ≤ 2 exp(−2nε²/(b − a)²),
 * so with probability ≥ 1 − δ, |X̄ − μ| ≤ (b − a)√(ln(2/δ)/(2n)).
 */
export function hoeffdingHalfWidth(n: number, range: number, delta: number): number {
  return range * Math.sqrt(Math.log(2 / delta) / (2 * n));
}

/**
 * Hoeffding interval at `level` (δ = 1 − level). Valid for any n and any distribution on
 * [a, b], hence wide. Since μ ∈ [a, b] for certain, the interval is intersected with [a, b];
 * `halfWidth` is then half the intersected width.
 */
export function hoeffdingInterval(summary: ReturnSummary, level: number, bounds: ReturnBounds | null | undefined): Interval {
  requireLevel(level);
  requireTwoEpisodes('hoeffding', summary);
  const [a, b] = requireBounds('hoeffding', bounds, summary);
  const halfWidth = hoeffdingHalfWidth(summary.n, b - a, 1 - level);
  return makeInterval('hoeffding', level, Math.max(a, summary.mean - halfWidth), Math.min(b, summary.mean + halfWidth));
}
