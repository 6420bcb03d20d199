import { InputError } from '../errors.js';
import { bcaBootstrapInterval } from './bootstrap-bca.js';
import { percentileBootstrapInterval } from './bootstrap-percentile.js';
import type { Interval } from './interval.js';
import { pairedDifferences } from './paired-differences.js';
import { pairedTTest } from './paired-t-test.js';
import { pairingGain } from './pairing-gain.js';

/** Interval methods for a paired difference: paired t, or a bootstrap of the differences. */
export const DIFFERENCE_METHODS = ['t', 'bootstrap', 'bootstrap-percentile'] as const;
export type DifferenceMethod = (typeof DIFFERENCE_METHODS)[number];

export interface PairedComparisonOptions {
  /** Two-sided confidence level, e.g. 0.95. */
  level: number;
  /** Interval for the mean difference (default `t`); `bootstrap` is BCa, as for one policy. */
  method?: DifferenceMethod;
  /** Run seed for the bootstrap (default 0). */
  seed?: number;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
  /** Told of the bootstrap's progress (resamples done of all). */
  onProgress?: (done: number, total: number) => void;
}

/** Everything `compare` reports for one ordered pair (first, second). */
export interface PairedComparison {
  /** Number of pairs (episode indices). */
  episodes: number;
  meanFirst: number;
  meanSecond: number;
  /** Mean of first − second. */
  meanDifference: number;
  /** Interval for the mean difference, by `method`. */
  interval: Interval;
  /** Paired t statistic and its two-sided p-value for "no difference" (whatever the interval method). */
  tStatistic: number;
  pValue: number;
  /** Correlation of the paired returns and the variance factor (Var A + Var B)/Var(A − B). */
  correlation: number;
  varianceReduction: number;
}

/**
 * Compares two policies run on the same episode indices with common random numbers: the mean of
 * the paired differences with a paired t interval (Student 1908) or a bootstrap of the
 * differences (BCa: Efron 1987; percentile: Efron & Tibshirani 1993), the paired t p-value, and
 * what pairing bought (docs/methods.md §8.1–8.2). The bootstrap resamples whole pairs, since the pairs
 * are the independent units.
 */
export function comparePair(
  first: Float64Array | number[],
  second: Float64Array | number[],
  options: PairedComparisonOptions,
): PairedComparison {
  const method = options.method ?? 't';
  if (!(DIFFERENCE_METHODS as readonly string[]).includes(method)) {
    throw new InputError('--ci', `unknown method "${method}" for a difference; choose one of ${DIFFERENCE_METHODS.join(', ')}`);
  }
  const differences = pairedDifferences(first, second);
  const test = pairedTTest(differences, options.level);
  const summary = test.differences;
  const bootstrap = { seed: options.seed, resamples: options.resamples, onProgress: options.onProgress };
  const interval =
    method === 't'
      ? test.interval
      : method === 'bootstrap'
        ? bcaBootstrapInterval(differences, summary, options.level, bootstrap)
        : percentileBootstrapInterval(differences, summary, options.level, bootstrap);
  const gain = pairingGain(first, second);
  return {
    episodes: summary.n,
    meanFirst: mean(first),
    meanSecond: mean(second),
    meanDifference: summary.mean,
    interval,
    tStatistic: test.tStatistic,
    pValue: test.pValue,
    correlation: gain.correlation,
    varianceReduction: gain.varianceReduction,
  };
}

function mean(values: Float64Array | number[]): number {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += values[i];
  return sum / values.length;
}
