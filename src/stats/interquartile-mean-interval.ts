import { STREAM, streamFor } from '../engine/streams.js';
import { InputError } from '../errors.js';
import { DEFAULT_RESAMPLES, requireResamples } from './bootstrap-resample.js';
import { trimmedMeanOfCounts, trimmedMeanOfSorted } from './interquartile-mean.js';
import { distinctValues, drawFrequentCounts, groupForResampling } from './resample-groups.js';
import { makeInterval, requireLevel, type Interval } from './interval.js';
import { sortedQuantile } from './sample-quantile.js';

export interface StratifiedBootstrapOptions {
  /** Run seed; draws come from its BOOTSTRAP stream (default 0). */
  seed?: number;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
}

/**
 * Percentile interval for the interquartile mean of pooled scores by the stratified bootstrap
 * (Agarwal et al. 2021, NeurIPS, "Deep Reinforcement Learning at the Edge of the Statistical
 * Precipice", who resample runs within each task; Efron & Tibshirani 1993, ch. 13, for the
 * percentile interval). Each stratum (a task, an environment, a start state: a group whose size
 * was fixed by design) is resampled within itself with replacement, so every resample keeps
 * the design's group sizes. One stratum gives the ordinary bootstrap. A resample is kept as
 * counts over the distinct values (resample-groups.ts), so its trimmed mean is one pass over
 * them, with no sort: O(B·(D + n)) for D distinct values, and far less when values repeat.
 */
export function interquartileMeanInterval(
  strata: readonly (Float64Array | number[])[],
  level: number,
  options: StratifiedBootstrapOptions = {},
): { estimate: number; interval: Interval } {
  requireLevel(level);
  const resamples = options.resamples ?? DEFAULT_RESAMPLES;
  requireResamples(resamples);
  const total = strata.reduce((sum, stratum) => sum + stratum.length, 0);
  if (strata.length === 0 || strata.some((stratum) => stratum.length === 0)) {
    throw new InputError('returns', 'every stratum of the bootstrap needs at least one return');
  }
  const categories = distinctValues(strata);
  const groups = strata.map((stratum) => groupForResampling(stratum, categories));
  const counts = new Float64Array(categories.length);
  const pooled = new Float64Array(total);
  let offset = 0;
  for (const stratum of strata) {
    pooled.set(stratum, offset);
    offset += stratum.length;
  }
  const estimate = trimmedMeanOfSorted(pooled.sort());

  const rng = streamFor(options.seed ?? 0, STREAM.BOOTSTRAP);
  const draws = new Float64Array(Math.max(0, ...groups.map((g) => g.frequent.length)));
  const estimates = new Float64Array(resamples);
  for (let b = 0; b < resamples; b++) {
    counts.fill(0);
    for (const group of groups) {
      const left = drawFrequentCounts(group, rng, draws);
      for (let g = 0; g < group.frequent.length; g++) counts[group.frequent[g]] += draws[g];
      const rare = group.rare;
      for (let i = 0; i < left; i++) counts[rare[rng.integer(rare.length)]]++;
    }
    estimates[b] = trimmedMeanOfCounts(categories, counts, total);
  }
  estimates.sort();
  const alpha = 1 - level;
  return {
    estimate,
    interval: makeInterval('bootstrap-percentile', level, sortedQuantile(estimates, alpha / 2), sortedQuantile(estimates, 1 - alpha / 2)),
  };
}
