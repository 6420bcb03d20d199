import tCdfImpl from '@stdlib/stats-base-dists-t-cdf';
import { requireLevel } from './interval.js';
import { tQuantile } from './quantiles.js';
import { satterthwaite } from './groups/satterthwaite.js';

/** Welch's interval and test for the difference of two independent samples' means. */
export interface WelchComparison {
  /** Mean of the first sample minus mean of the second. */
  readonly meanDifference: number;
  /** √(s₁²/n₁ + s₂²/n₂). */
  readonly standardError: number;
  /** Welch–Satterthwaite degrees of freedom (fractional). */
  readonly degreesOfFreedom: number;
  readonly low: number;
  readonly high: number;
  readonly level: number;
  /** Two-sided p-value of "equal means". */
  readonly pValue: number;
  readonly tStatistic: number;
}

export interface SampleMoments {
  readonly n: number;
  readonly mean: number;
  /** Sample variance, divisor n − 1. */
  readonly variance: number;
}

/**
 * Welch's unequal-variance t interval and test (Welch 1947, "The generalization of 'Student's'
 * problem when several different population variances are involved", Biometrika 34:28–35;
 * degrees of freedom by Satterthwaite 1946, Biometrics Bulletin 2(6):110–114; docs/methods.md
 * §8.6): for runs that did not share their random numbers, so the returns cannot be paired,
 *
 *   D̄ ± t_{1−α/2, ν} se,  se² = s₁²/n₁ + s₂²/n₂,  ν = se⁴ / ((s₁²/n₁)²/(n₁−1) + (s₂²/n₂)²/(n₂−1)),
 *
 * and p = 2 P(T_ν ≥ |D̄/se|). Both samples must have at least two returns.
 */
export function welchComparison(a: SampleMoments, b: SampleMoments, level: number): WelchComparison {
  requireLevel(level);
  if (a.n < 2 || b.n < 2) throw new RangeError(`welchComparison: each sample needs at least two returns (got ${a.n} and ${b.n})`);
  const va = a.variance / a.n;
  const vb = b.variance / b.n;
  const standardError = Math.sqrt(va + vb);
  const meanDifference = a.mean - b.mean;
  if (standardError === 0) {
    // No spread in either sample: the difference is known exactly.
    return { meanDifference, standardError, degreesOfFreedom: Infinity, low: meanDifference, high: meanDifference, level, pValue: meanDifference === 0 ? 1 : 0, tStatistic: meanDifference === 0 ? Number.NaN : Math.sign(meanDifference) * Infinity };
  }
  const degreesOfFreedom = satterthwaite([va, a.n - 1], [vb, b.n - 1]);
  const halfWidth = tQuantile(1 - (1 - level) / 2, Math.max(1, degreesOfFreedom)) * standardError;
  const tStatistic = meanDifference / standardError;
  const pValue = Math.min(1, 2 * tCdfImpl(-Math.abs(tStatistic), degreesOfFreedom));
  return { meanDifference, standardError, degreesOfFreedom, low: meanDifference - halfWidth, high: meanDifference + halfWidth, level, pValue, tStatistic };
}
