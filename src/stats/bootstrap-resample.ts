import { STREAM, streamFor } from '../engine/streams.js';
import { InputError } from '../errors.js';

/** Resamples used when the caller names none (Efron & Tibshirani 1993 §13.3 suggest ≥ 1000 for percentiles). */
export const DEFAULT_RESAMPLES = 2000;

/** Fewer resamples than this make the tail quantiles too coarse to report. */
export const MIN_RESAMPLES = 100;

export interface BootstrapOptions {
  /** Run seed; the draws come from its BOOTSTRAP stream, so the interval is reproducible. Default 0. */
  seed?: number;
  /** Number of resamples B (default {@link DEFAULT_RESAMPLES}). */
  resamples?: number;
}

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
 * below θ̂" an exact sign test, which BCa's bias correction counts. One buffer for the centred
 * data and one for the results; nothing is allocated per resample.
 */
export function resampledMeanDeviations(
  returns: Float64Array | number[],
  n: number,
  mean: number,
  resamples: number,
  seed: number,
): Float64Array {
  const centred = new Float64Array(n);
  for (let i = 0; i < n; i++) centred[i] = returns[i] - mean;
  const rng = streamFor(seed, STREAM.BOOTSTRAP);
  const deviations = new Float64Array(resamples);
  for (let b = 0; b < resamples; b++) {
    let sum = 0;
    for (let i = 0; i < n; i++) sum += centred[rng.integer(n)];
    deviations[b] = sum / n;
  }
  return deviations.sort();
}
