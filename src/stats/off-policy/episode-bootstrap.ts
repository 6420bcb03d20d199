import { STREAM, streamFor } from '../../engine/streams.js';
import { bcaBiasCorrection } from '../bootstrap-bca.js';
import { requireResamples } from '../bootstrap-resample.js';
import { requireLevel } from '../interval.js';
import { normalCdf, normalQuantile } from '../quantiles.js';
import { sortedQuantile } from '../sample-quantile.js';

export interface EpisodeBootstrapInterval {
  readonly percentile: readonly [number, number];
  readonly bca: readonly [number, number];
  /** Replicates in which the estimate was defined (a weighted one is not when every weight is 0). */
  readonly replicates: number;
}

/**
 * Bootstrap over whole episodes (Efron & Tibshirani 1993, An Introduction to the Bootstrap;
 * resampling episodes, never steps, and recomputing every normaliser inside each replicate,
 * as off-policy estimators need): B replicates of n episodes drawn with replacement, given to
 * `estimate` as the count of each episode. Percentile interval: the α/2 and 1 − α/2 quantiles
 * of the replicates (ch. 13). BCa (Efron 1987, JASA 82:171–185): the same replicates at
 * Φ(ẑ0 + (ẑ0 + z)/(1 − â(ẑ0 + z))), with the acceleration from empirical influence values,
 * â = ΣU³/(6(ΣU²)^{3/2}) (Efron 1987), so no jackknife loop runs. Both are approximate.
 */
export function episodeBootstrap(
  n: number,
  pointEstimate: number,
  estimate: (counts: Float64Array) => number,
  influence: Float64Array,
  level: number,
  options: { resamples: number; seed: number },
): EpisodeBootstrapInterval {
  requireLevel(level);
  requireResamples(options.resamples);
  const rng = streamFor(options.seed, STREAM.BOOTSTRAP, 2);
  const counts = new Float64Array(n);
  const deviations: number[] = [];
  for (let b = 0; b < options.resamples; b++) {
    counts.fill(0);
    for (let i = 0; i < n; i++) counts[rng.integer(n)]++;
    const value = estimate(counts);
    if (Number.isFinite(value)) deviations.push(value - pointEstimate);
  }
  if (deviations.length < 2 || !Number.isFinite(pointEstimate)) {
    return { percentile: [Number.NaN, Number.NaN], bca: [Number.NaN, Number.NaN], replicates: deviations.length };
  }
  const sorted = Float64Array.from(deviations).sort();
  const alpha = 1 - level;
  const percentile = [pointEstimate + sortedQuantile(sorted, alpha / 2), pointEstimate + sortedQuantile(sorted, 1 - alpha / 2)] as const;
  const z0 = bcaBiasCorrection(sorted);
  const acceleration = influenceAcceleration(influence);
  const z = normalQuantile(alpha / 2);
  const adjusted = (zq: number): number => {
    const shifted = z0 + zq;
    const denominator = 1 - acceleration * shifted;
    if (denominator <= 0) return shifted > 0 ? 1 : 0;
    return normalCdf(z0 + shifted / denominator);
  };
  const bca = [pointEstimate + sortedQuantile(sorted, adjusted(z)), pointEstimate + sortedQuantile(sorted, adjusted(-z))] as const;
  return { percentile, bca, replicates: sorted.length };
}

/** â = ΣU³/(6(ΣU²)^{3/2}); 0 when every influence value is 0. */
export function influenceAcceleration(influence: Float64Array): number {
  let squares = 0;
  let cubes = 0;
  for (const u of influence) {
    squares += u * u;
    cubes += u * u * u;
  }
  return squares > 0 ? cubes / (6 * Math.pow(squares, 1.5)) : 0;
}

/** Counts-weighted mean, the replicate of an estimator that is a mean of per-episode values. */
export function countedMean(values: Float64Array): (counts: Float64Array) => number {
  return (counts) => {
    let sum = 0;
    let total = 0;
    for (let i = 0; i < values.length; i++) {
      sum += counts[i] * values[i];
      total += counts[i];
    }
    return sum / total;
  };
}
