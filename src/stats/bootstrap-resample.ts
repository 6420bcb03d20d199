import { STREAM, streamFor } from '../engine/streams.js';
import { InputError } from '../errors.js';
import { drawFrequentCounts, resamplingOf } from './resample-groups.js';

/** Resamples used when the caller names none (Efron & Tibshirani 1993 §13.3 suggest ≥ 1000 for percentiles). */
export const DEFAULT_RESAMPLES = 2000;

/** Fewer resamples than this make the tail quantiles too coarse to report. */
export const MIN_RESAMPLES = 100;

export interface BootstrapOptions {
  /** Run seed; the draws come from its BOOTSTRAP stream, so the interval is reproducible. Default 0. */
  seed?: number;
  /** Number of resamples B (default {@link DEFAULT_RESAMPLES}). */
  resamples?: number;
  /** Called now and then with the resamples done so far (for a progress display). */
  onProgress?: (done: number, total: number) => void;
}

/** Resamples between two progress calls. */
export const PROGRESS_EVERY = 64;

export function requireResamples(resamples: number): void {
  if (!Number.isInteger(resamples) || resamples < MIN_RESAMPLES) {
    throw new InputError('--resamples', `must be an integer ≥ ${MIN_RESAMPLES} (got ${resamples})`);
  }
}

/**
 * Nonparametric bootstrap of the mean (Efron & Tibshirani 1993, An Introduction to the
 * Bootstrap, ch. 6): B resamples of size n drawn with replacement from the first n returns.
 *
 * Returns the resampled means minus the sample mean, θ*_b − θ̂, sorted ascending. Working with
 * deviations keeps the sums small (no cancellation against a large mean) and makes "θ*_b
 * below θ̂" an exact sign test, which BCa's bias correction counts.
 *
 * Returns that repeat often (a gridworld's few paths) are resampled as counts, one binomial
 * draw per frequent value (resample-groups.ts); the other returns by index draws. When no
 * value is frequent, the indices are exactly the draws `streamFor(seed, STREAM.BOOTSTRAP)
 * .integer(n)` would give, with the xoshiro128** step (engine/xoshiro128.ts) run on local
 * copies of the generator's state: calling through the object costs about three times as
 * much, and n·B draws dominate the run time. A test checks the draws match the generator's.
 */
export function resampledMeanDeviations(
  returns: Float64Array | number[],
  n: number,
  mean: number,
  resamples: number,
  seed: number,
  onProgress?: (done: number, total: number) => void,
): Float64Array {
  const sample = returns.length === n ? returns : returns.slice(0, n);
  const { categories, groups } = resamplingOf(sample);
  const frequentValues = Float64Array.from(groups.frequent, (d) => categories[d] - mean);
  const frequentDraws = new Float64Array(groups.frequent.length);
  const rare = Float64Array.from(groups.rare, (i) => sample[i] - mean);
  const rareCount = rare.length;
  const rng = streamFor(seed, STREAM.BOOTSTRAP);
  const deviations = new Float64Array(resamples);
  for (let b = 0; b < resamples; b++) {
    const left = drawFrequentCounts(groups, rng, frequentDraws);
    let sum = 0;
    for (let g = 0; g < frequentDraws.length; g++) sum += frequentDraws[g] * frequentValues[g];
    let s0 = rng.s0;
    let s1 = rng.s1;
    let s2 = rng.s2;
    let s3 = rng.s3;
    for (let i = 0; i < left; i++) {
      const scaled = Math.imul(s1, 5);
      const bits = Math.imul((scaled << 7) | (scaled >>> 25), 9) >>> 0;
      const shifted = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= shifted;
      s3 = (s3 << 11) | (s3 >>> 21);
      sum += rare[(bits * UINT32_TO_UNIT * rareCount) | 0]; // = Math.floor for values in [0, 2³¹)
    }
    rng.s0 = s0;
    rng.s1 = s1;
    rng.s2 = s2;
    rng.s3 = s3;
    deviations[b] = sum / n;
    if (onProgress && (b + 1) % PROGRESS_EVERY === 0) onProgress(b + 1, resamples);
  }
  return deviations.sort();
}

/** 2⁻³², as in Xoshiro128.uniform(). */
const UINT32_TO_UNIT = 2.3283064365386963e-10;
