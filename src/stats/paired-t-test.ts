import tCdfImpl from '@stdlib/stats-base-dists-t-cdf';
import { requireLevel, requireTwoEpisodes, type Interval } from './interval.js';
import { summarize, type ReturnSummary } from './summary.js';
import { tInterval } from './t-interval.js';

/** The paired t test of "no difference" and the matching interval for the mean difference. */
export interface PairedTTest {
  /** Summary of the differences D_i = first_i − second_i. */
  differences: ReturnSummary;
  /** D̄ ± t_{1−α/2, n−1} s_D/√n (method `t`). */
  interval: Interval;
  /** D̄/(s_D/√n); ±Infinity when every difference is the same non-zero value, NaN when all are 0. */
  tStatistic: number;
  degreesOfFreedom: number;
  /** Two-sided p-value 2·P(T_{n−1} ≥ |t|); 1 when every difference is 0. */
  pValue: number;
}

/**
 * Paired t test (Student 1908, Biometrika 6:1–25; as in NIST/SEMATECH e-Handbook 1.3.5.3;
 * docs/methods.md §8.2): the one-sample t test applied to the differences of paired returns. Under
 * common random numbers the pairs, not the two samples, are independent, so this is the test to
 * use; a two-sample (Welch) test would misstate the variance. `differences` are first − second.
 */
export function pairedTTest(differences: Float64Array | number[], level: number): PairedTTest {
  requireLevel(level);
  const summary = summarize(differences);
  requireTwoEpisodes('t', summary);
  const degreesOfFreedom = summary.n - 1;
  const interval = tInterval(summary, level);
  if (summary.stderr === 0) {
    const tStatistic = summary.mean === 0 ? Number.NaN : Math.sign(summary.mean) * Infinity;
    return { differences: summary, interval, tStatistic, degreesOfFreedom, pValue: summary.mean === 0 ? 1 : 0 };
  }
  const tStatistic = summary.mean / summary.stderr;
  // The lower tail at −|t| keeps its digits where 1 − F(|t|) would cancel.
  const pValue = Math.min(1, 2 * tCdfImpl(-Math.abs(tStatistic), degreesOfFreedom));
  return { differences: summary, interval, tStatistic, degreesOfFreedom, pValue };
}
