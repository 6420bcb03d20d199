import { requireLevel } from '../interval.js';

/**
 * A one-sided lower confidence bound for the mean of independent X_i ≥ 0 with no upper bound,
 * by betting (the capital process of Waudby-Smith & Ramdas, JRSS-B 86(1), 2024, with bets
 * truncated for an unbounded right tail; derivation in docs/methods.md §13.4): for a candidate
 * mean m the capital K_t(m) = Π_{i≤t} (1 + λ_i(m)(X_i − m)), λ_i(m) = min(λ_i, c/m), is a
 * nonnegative martingale when m is the mean, since every factor is at least 1 − c > 0. By
 * Ville's inequality P(sup_t K_t(μ) ≥ 1/α) ≤ α, so the m whose capital ever reaches 1/α are
 * excluded. K_t(m) does not increase with m, so the excluded set is an interval [0, L): L is the
 * bound, valid at any n, however heavy the tail of the importance weights.
 *
 * Bets: the predictable plug-in λ_t = √(2 ln(1/α)/(n σ̂²_{t−1})) tuned to the sample size, with
 * σ̂²_t = (1/4 + Σ(X_i − μ̂_i)²)/(t + 1), μ̂_t = (1/2 + ΣX_i)/(t + 1) (their fixed-n tuning). The
 * X should be on a unit scale (a return mapped to [0, 1] times its weight).
 */
export function nonnegativeBettingLowerBound(x: Float64Array | number[], level: number, truncation = 0.5): number {
  requireLevel(level);
  const n = x.length;
  if (n === 0) return 0;
  const alpha = 1 - level;
  const bets = new Float64Array(n);
  let sum = 0;
  let squares = 0;
  let previousVariance = 0.25;
  let largest = 0;
  for (let t = 0; t < n; t++) {
    if (!(x[t] >= 0)) throw new RangeError(`nonnegativeBettingLowerBound: every value must be ≥ 0 (got ${x[t]} at ${t})`);
    bets[t] = Math.sqrt((2 * Math.log(1 / alpha)) / (n * previousVariance));
    sum += x[t];
    const mean = (0.5 + sum) / (t + 2);
    squares += (x[t] - mean) ** 2;
    previousVariance = (0.25 + squares) / (t + 2);
    largest = Math.max(largest, x[t]);
  }
  const threshold = Math.log(1 / alpha);
  const reaches = (m: number): boolean => {
    let logCapital = 0;
    const cap = truncation / m;
    for (let t = 0; t < n; t++) {
      logCapital += Math.log1p(Math.min(bets[t], cap) * (x[t] - m));
      if (logCapital >= threshold) return true;
    }
    return false;
  };
  let low = 1e-12;
  let high = Math.max(largest, 1e-9);
  if (!reaches(low)) return 0;
  while (high - low > 1e-10 * Math.max(1, high)) {
    const mid = 0.5 * (low + high);
    if (reaches(mid)) low = mid;
    else high = mid;
  }
  return low;
}
