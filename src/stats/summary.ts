import { InputError } from '../errors.js';

/** What every interval and projection needs to know about a sample of returns. */
export interface ReturnSummary {
  /** Number of returns. */
  n: number;
  mean: number;
  /** Sample standard deviation (divisor n − 1); 0 when n < 2. */
  std: number;
  /** Sample variance (divisor n − 1); 0 when n < 2. */
  variance: number;
  /** Standard error of the mean, std/√n; 0 when n < 2. */
  stderr: number;
  min: number;
  max: number;
}

/**
 * Summarises the first `count` returns (default: all of them).
 *
 * Uses the corrected two-pass algorithm (Chan, Golub & LeVeque 1983, "Algorithms for
 * computing the sample variance: analysis and recommendations", Am. Statist. 37:242–247):
 * the mean first, then Σ(x − x̄)² − (Σ(x − x̄))²/n, where the second term removes most of
 * the rounding error of the first-pass mean. Returns with a large offset and a small spread
 * (NIST StRD NumAcc4) keep their digits, unlike the one-pass Σx² − n x̄². Summation runs in
 * index order, so the result is the same on every run.
 *
 * For n = 1 the spread is reported as 0 rather than NaN; intervals refuse n < 2 themselves.
 */
export function summarize(returns: Float64Array | number[], count?: number): ReturnSummary {
  const n = count ?? returns.length;
  if (!Number.isInteger(n) || n < 0 || n > returns.length) {
    throw new RangeError(`summarize: count must be an integer in [0, ${returns.length}] (got ${count})`);
  }
  if (n === 0) throw new InputError('returns', 'no episodes to summarise');

  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    const x = returns[i];
    if (!Number.isFinite(x)) {
      throw new InputError('returns', `episode ${i} has a return that is not a finite number (${x})`);
    }
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const firstMean = sum / n;

  let deviationSum = 0;
  let squaredDeviationSum = 0;
  for (let i = 0; i < n; i++) {
    const d = returns[i] - firstMean;
    deviationSum += d;
    squaredDeviationSum += d * d;
  }
  // The refined mean stays inside [min, max] even when rounding would push it out.
  const mean = Math.min(max, Math.max(min, firstMean + deviationSum / n));
  const variance =
    n < 2 ? 0 : Math.max(0, (squaredDeviationSum - (deviationSum * deviationSum) / n) / (n - 1));
  const std = Math.sqrt(variance);
  return { n, mean, std, variance, stderr: std / Math.sqrt(n), min, max };
}
