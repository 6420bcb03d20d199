import { STREAM, streamFor } from '../engine/streams.js';
import type { Xoshiro128 } from '../engine/xoshiro128.js';
import { InputError } from '../errors.js';
import { DEFAULT_RESAMPLES, PROGRESS_EVERY, requireResamples } from './bootstrap-resample.js';
import { trimmedMeanOfCounts, trimmedMeanOfSorted } from './interquartile-mean.js';
import { distinctValues, drawFrequentCounts, groupForResampling, lowerBound } from './resample-groups.js';
import { makeInterval, requireLevel, type Interval } from './interval.js';
import { sortedQuantile } from './sample-quantile.js';

export interface StratifiedBootstrapOptions {
  /** Run seed; draws come from its BOOTSTRAP stream (default 0). */
  seed?: number;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
  /** Called now and then with the resamples done so far (for a progress display). */
  onProgress?: (done: number, total: number) => void;
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
  const rareCategories = groups.map((group, s) => Int32Array.from(group.rare, (i) => lowerBound(categories, strata[s][i])));
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
    groups.forEach((group, s) => {
      const left = drawFrequentCounts(group, rng, draws);
      for (let g = 0; g < group.frequent.length; g++) counts[group.frequent[g]] += draws[g];
      addRareDraws(rareCategories[s], left, rng, counts);
    });
    estimates[b] = trimmedMeanOfCounts(categories, counts, total);
    if (options.onProgress && (b + 1) % PROGRESS_EVERY === 0) options.onProgress(b + 1, resamples);
  }
  estimates.sort();
  const alpha = 1 - level;
  return {
    estimate,
    interval: makeInterval('bootstrap-percentile', level, sortedQuantile(estimates, alpha / 2), sortedQuantile(estimates, 1 - alpha / 2)),
  };
}

/**
 * `draws` index draws over the rare observations, counted into `counts`: exactly
 * `counts[rare[rng.integer(rare.length)]]++` repeated, with the xoshiro128** step on local
 * copies of the generator's state (as bootstrap-resample.ts does, for the same reason).
 */
function addRareDraws(rare: Int32Array, draws: number, rng: Xoshiro128, counts: Float64Array): void {
  const size = rare.length;
  let s0 = rng.s0;
  let s1 = rng.s1;
  let s2 = rng.s2;
  let s3 = rng.s3;
  for (let i = 0; i < draws; i++) {
    const scaled = Math.imul(s1, 5);
    const bits = Math.imul((scaled << 7) | (scaled >>> 25), 9) >>> 0;
    const shifted = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= shifted;
    s3 = (s3 << 11) | (s3 >>> 21);
    counts[rare[(bits * UINT32_TO_UNIT * size) | 0]]++;
  }
  rng.s0 = s0;
  rng.s1 = s1;
  rng.s2 = s2;
  rng.s3 = s3;
}

/** 2⁻³², as in Xoshiro128.uniform(). */
const UINT32_TO_UNIT = 2.3283064365386963e-10;
