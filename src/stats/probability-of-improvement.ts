import { InputError } from '../errors.js';
import { makeInterval, requireLevel, type Interval } from './interval.js';
import { requireSamePairs } from './paired-differences.js';
import { normalQuantile } from './quantiles.js';

/**
 * Probability of improvement P(X > Y), ties counted as ½ (Agarwal, Schwarzer, Castro,
 * Courville & Bellemare 2021, "Deep Reinforcement Learning at the Edge of the Statistical
 * Precipice", NeurIPS; formulas from memory; docs/methods.md §8.4): the Mann–Whitney statistic
 * U/(NK) = (1/(NK)) Σ_i Σ_j S(x_i, y_j), S = 1 if x > y, ½ if equal, 0 otherwise (Mann &
 * Whitney 1947, Ann. Math. Statist. 18:50–60). ½ means neither policy tends to return more.
 * Sorting makes it O((N + K) log K) instead of N·K comparisons.
 */
export function probabilityOfImprovement(x: Float64Array | number[], y: Float64Array | number[]): number {
  requireNonEmpty(x, y);
  const sortedY = Float64Array.from(y).sort();
  let score = 0;
  for (let i = 0; i < x.length; i++) {
    const below = lowerBound(sortedY, x[i]);
    const notAbove = upperBound(sortedY, x[i]);
    score += below + 0.5 * (notAbove - below);
  }
  return score / (x.length * sortedY.length);
}

/** How the two samples were drawn: on the same episodes (pairs) or each on its own. */
export type Resampling = 'paired' | 'independent';

export interface ImprovementOptions {
  /**
   * `paired` (default): x_i and y_i come from the same episode, as common random numbers give,
   * so the pairs are the independent units and the variance counts their covariance.
   * `independent`: the samples were drawn apart (for runs on different episodes).
   */
  resampling?: Resampling;
}

export interface ImprovementEstimate {
  /** U/(NK) on the observed samples. */
  estimate: number;
  /** Normal interval from the U-statistic's standard error, within [0, 1]. */
  interval: Interval;
}

/**
 * P(X > Y) with a normal interval θ̂ ± z·se from the U-statistic's variance, in O((N + K)
 * log(N + K)). With the placements P_i = (#y < x_i + ½ #y = x_i)/K and Q_j = (#x > y_j +
 * ½ #x = y_j)/N, θ̂ is the mean of either, and θ̂ − θ is to first order the mean of the
 * centred placements (Hoeffding 1948, "A class of statistics with asymptotically normal
 * distribution", Ann. Math. Statist. 19:293–325). For independent samples this gives DeLong,
 * DeLong & Clarke-Pearson's structural-component variance (1988, Biometrics 44:837–845)
 * se² = s²(P)/N + s²(Q)/K, which is also the variance of Brunner & Munzel's test (2000,
 * Biometrical Journal 42:17–25). For pairs (x_i, y_i) of one episode the two placements of
 * an episode move together: se² = s²(P_i + Q_i)/n, DeLong et al.'s variance with the
 * covariance term of paired samples. Sample variances use divisor n − 1; the interval is
 * clipped to [0, 1], where a probability lies.
 */
export function probabilityOfImprovementInterval(
  x: Float64Array | number[],
  y: Float64Array | number[],
  level: number,
  options: ImprovementOptions = {},
): ImprovementEstimate {
  requireLevel(level);
  requireNonEmpty(x, y);
  const resampling = options.resampling ?? 'paired';
  if (resampling === 'paired') requireSamePairs(x, y);
  const sortedX = Float64Array.from(x).sort();
  const sortedY = Float64Array.from(y).sort();
  const placeX = placements(x, sortedX, sortedY, 'below');
  const placeY = placements(y, sortedY, sortedX, 'above');
  let score = 0; // summed as probabilityOfImprovement does, so the two agree to the bit
  for (let i = 0; i < placeX.length; i++) score += placeX[i];
  const estimate = score / (x.length * y.length);
  scale(placeX, 1 / y.length);
  scale(placeY, 1 / x.length);
  let variance: number;
  if (resampling === 'paired') {
    for (let i = 0; i < placeX.length; i++) placeX[i] += placeY[i];
    variance = sampleVariance(placeX) / placeX.length;
  } else {
    variance = sampleVariance(placeX) / placeX.length + sampleVariance(placeY) / placeY.length;
  }
  const z = normalQuantile(1 - (1 - level) / 2);
  const halfWidth = z * Math.sqrt(variance);
  return {
    estimate,
    interval: makeInterval('normal', level, Math.max(0, estimate - halfWidth), Math.min(1, estimate + halfWidth)),
  };
}

/**
 * For each value, how many of `sortedOther` lie below it (`below`) or above it (`above`), ties
 * counting ½. The counts are found once per distinct value by merging the two sorted samples,
 * then looked up per observation in the (usually short, cache-resident) table of distinct values.
 */
function placements(values: ArrayLike<number>, sortedSelf: Float64Array, sortedOther: Float64Array, side: 'below' | 'above'): Float64Array {
  const m = sortedOther.length;
  const distinct = new Float64Array(sortedSelf.length);
  const counts = new Float64Array(sortedSelf.length);
  let d = 0;
  let lower = 0; // #other < value
  let upper = 0; // #other ≤ value
  for (let i = 0; i < sortedSelf.length; i++) {
    const v = sortedSelf[i];
    if (d > 0 && distinct[d - 1] === v) continue;
    while (lower < m && sortedOther[lower] < v) lower++;
    if (upper < lower) upper = lower;
    while (upper < m && sortedOther[upper] <= v) upper++;
    const tied = 0.5 * (upper - lower);
    distinct[d] = v;
    counts[d] = side === 'below' ? lower + tied : m - upper + tied;
    d++;
  }
  const table = distinct.subarray(0, d);
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = counts[indexOf(table, values[i])];
  return out;
}

/** Position of v in ascending distinct `sorted`, which holds it. */
function indexOf(sorted: Float64Array, v: number): number {
  let lo = 0;
  let hi = sorted.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function scale(values: Float64Array, factor: number): void {
  for (let i = 0; i < values.length; i++) values[i] *= factor;
}

function meanOf(values: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += values[i];
  return sum / values.length;
}

/** Two-pass sample variance (divisor n − 1), 0 for a single value. */
function sampleVariance(values: Float64Array): number {
  const n = values.length;
  if (n < 2) return 0;
  const mean = meanOf(values);
  let squares = 0;
  for (let i = 0; i < n; i++) squares += (values[i] - mean) ** 2;
  return squares / (n - 1);
}

function requireNonEmpty(x: ArrayLike<number>, y: ArrayLike<number>): void {
  if (x.length === 0 || y.length === 0) throw new InputError('returns', 'probability of improvement needs returns from both policies');
}

/** Index of the first element ≥ v in ascending `sorted`. */
function lowerBound(sorted: Float64Array, v: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Index of the first element > v in ascending `sorted`. */
function upperBound(sorted: Float64Array, v: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] <= v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
