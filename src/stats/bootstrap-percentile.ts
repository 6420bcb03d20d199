import { makeInterval, requireLevel, requireTwoEpisodes, type Interval } from './interval.js';
import { DEFAULT_RESAMPLES, requireResamples, resampledMeanDeviations, type BootstrapOptions } from './bootstrap-resample.js';
import { sortedQuantile } from './sample-quantile.js';
import type { ReturnSummary } from './summary.js';

/**
 * Percentile bootstrap interval (Efron & Tibshirani 1993, An Introduction to the Bootstrap,
 * ch. 13): the α/2 and 1 − α/2 quantiles of the B resampled means, read with Hyndman & Fan's
 * definition 7 (see sample-quantile.ts). Makes no normality assumption, but for skewed returns
 * it is shifted the wrong way; BCa corrects that.
 */
export function percentileBootstrapInterval(
  returns: Float64Array | number[],
  summary: ReturnSummary,
  level: number,
  options: BootstrapOptions = {},
): Interval {
  requireLevel(level);
  requireTwoEpisodes('bootstrap-percentile', summary);
  const resamples = options.resamples ?? DEFAULT_RESAMPLES;
  requireResamples(resamples);
  const deviations = resampledMeanDeviations(returns, summary.n, summary.mean, resamples, options.seed ?? 0, options.onProgress);
  const alpha = 1 - level;
  return makeInterval(
    'bootstrap-percentile',
    level,
    summary.mean + sortedQuantile(deviations, alpha / 2),
    summary.mean + sortedQuantile(deviations, 1 - alpha / 2),
  );
}
