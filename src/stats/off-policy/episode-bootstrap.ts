import { STREAM, streamFor } from '../../engine/streams.js';
import { bcaBiasCorrection } from '../bootstrap-bca.js';
import { requireResamples, resampledMeanDeviations } from '../bootstrap-resample.js';
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
  const counts = new Float64Array(n);
  const deviations: number[] = [];
  const draws = new ResampleCounts(options.seed);
  for (let b = 0; b < options.resamples; b++) {
    draws.fill(counts);
    const value = estimate(counts);
    if (Number.isFinite(value)) deviations.push(value - pointEstimate);
  }
  return intervalsFromDeviations(Float64Array.from(deviations).sort(), pointEstimate, influence, level);
}

/**
 * The same for an estimator that is the mean of per-episode values (IS, PDIS, DR): the
 * replicates are resampled means (bootstrap-resample.ts), and the influence values are x_i − x̄.
 */
export function meanBootstrap(values: Float64Array, mean: number, level: number, options: { resamples: number; seed: number }): EpisodeBootstrapInterval {
  requireLevel(level);
  requireResamples(options.resamples);
  const deviations = resampledMeanDeviations(values, values.length, mean, options.resamples, options.seed);
  const influence = values.map((v) => v - mean);
  return intervalsFromDeviations(deviations, mean, influence, level);
}

function intervalsFromDeviations(sorted: Float64Array, pointEstimate: number, influence: Float64Array, level: number): EpisodeBootstrapInterval {
  if (sorted.length < 2 || !Number.isFinite(pointEstimate)) {
    return { percentile: [Number.NaN, Number.NaN], bca: [Number.NaN, Number.NaN], replicates: sorted.length };
  }
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

/** 2⁻³², as in Xoshiro128.uniform(). */
const UINT32_TO_UNIT = 2.3283064365386963e-10;

/**
 * Resample counts from the seed's BOOTSTRAP stream (episode index 2, apart from the other
 * uses): exactly the draws `rng.integer(n)` would give, with the xoshiro128** step run on local
 * state because n·B calls through the generator object would dominate the time.
 */
class ResampleCounts {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  constructor(seed: number) {
    const rng = streamFor(seed, STREAM.BOOTSTRAP, 2);
    this.s0 = rng.s0;
    this.s1 = rng.s1;
    this.s2 = rng.s2;
    this.s3 = rng.s3;
  }
  fill(counts: Float64Array): void {
    const n = counts.length;
    counts.fill(0);
    let { s0, s1, s2, s3 } = this;
    for (let i = 0; i < n; i++) {
      const scaled = Math.imul(s1, 5);
      const bits = Math.imul((scaled << 7) | (scaled >>> 25), 9) >>> 0;
      const shifted = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= shifted;
      s3 = (s3 << 11) | (s3 >>> 21);
      counts[(bits * UINT32_TO_UNIT * n) | 0]++;
    }
    this.s0 = s0;
    this.s1 = s1;
    this.s2 = s2;
    this.s3 = s3;
  }
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

