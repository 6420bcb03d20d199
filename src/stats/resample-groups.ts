import type { Xoshiro128 } from '../engine/xoshiro128.js';
import { binomialSample } from './binomial-sample.js';

/**
 * A value that occurs at least this often in a sample is resampled by one binomial draw
 * (about 0.1–0.3 µs) rather than one index draw per occurrence (a few ns each).
 */
export const GROUP_AT = 32;

/**
 * A sample prepared for drawing bootstrap resamples as counts. A resample of size n with
 * replacement is a Multinomial(n; c_1/n, …, c_D/n) count over the sample's distinct values
 * (Efron & Tibshirani 1993, An Introduction to the Bootstrap, ch. 6). The count of each
 * frequent value is drawn as a binomial conditional on the counts drawn before it (the
 * standard chain of conditional binomials for a multinomial; e.g. Devroye 1986,
 * Non-Uniform Random Variate Generation, §XI.1), and what is left goes, one index draw each,
 * to the remaining observations, which are equally likely. That is exactly the
 * distribution of n index draws, but costs O(frequent values + rare observations) rather
 * than O(n): returns of a gridworld or a tabular model repeat a few values most of the time.
 */
export interface ResampleGroups {
  /** Sample size n. */
  readonly size: number;
  /** Positions (in `categories`) of the frequent values, most frequent first. */
  readonly frequent: Int32Array;
  /** How often each frequent value occurs. */
  readonly frequentCounts: Float64Array;
  /** Positions in the sample of the remaining observations, in sample order. */
  readonly rare: Int32Array;
}

/** Ascending distinct values of all the samples together. */
export function distinctValues(samples: readonly ArrayLike<number>[]): Float64Array {
  const total = samples.reduce((sum, sample) => sum + sample.length, 0);
  const all = new Float64Array(total);
  let at = 0;
  for (const sample of samples) for (let i = 0; i < sample.length; i++) all[at++] = sample[i];
  return distinctOfSorted(all.sort());
}

function distinctOfSorted(sorted: Float64Array): Float64Array {
  const out = new Float64Array(sorted.length);
  let m = 0;
  for (let i = 0; i < sorted.length; i++) if (m === 0 || sorted[i] !== out[m - 1]) out[m++] = sorted[i];
  return out.slice(0, m);
}

/** One sample's distinct values and groups, from a single sort. */
export function resamplingOf(sample: ArrayLike<number>): { categories: Float64Array; groups: ResampleGroups } {
  const sorted = Float64Array.from(sample as ArrayLike<number>).sort();
  const categories = distinctOfSorted(sorted);
  return { categories, groups: groupSorted(sample, sorted, categories) };
}

/** Index of the first element ≥ v in ascending `sorted`. */
export function lowerBound(sorted: Float64Array, v: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Splits `sample` into frequent values and rare observations; `categories` must hold every value. */
export function groupForResampling(sample: ArrayLike<number>, categories: Float64Array): ResampleGroups {
  return groupSorted(sample, Float64Array.from(sample as ArrayLike<number>).sort(), categories);
}

function groupSorted(sample: ArrayLike<number>, sorted: Float64Array, categories: Float64Array): ResampleGroups {
  const n = sample.length;
  const frequentValues: number[] = [];
  const counts: number[] = [];
  for (let i = 0; i < n; ) {
    let j = i + 1;
    while (j < n && sorted[j] === sorted[i]) j++;
    if (j - i >= GROUP_AT) {
      frequentValues.push(sorted[i]);
      counts.push(j - i);
    }
    i = j;
  }
  const order = counts.map((_, g) => g).sort((a, b) => counts[b] - counts[a] || a - b);
  const frequent = Int32Array.from(order, (g) => lowerBound(categories, frequentValues[g]));
  const frequentCounts = Float64Array.from(order, (g) => counts[g]);
  const frequentSorted = Float64Array.from(frequentValues); // ascending, as found
  let rareCount = n;
  for (const c of counts) rareCount -= c;
  const rare = new Int32Array(rareCount);
  let r = 0;
  for (let i = 0; i < n; i++) {
    const v = sample[i];
    if (frequentSorted.length > 0) {
      const g = lowerBound(frequentSorted, v);
      if (g < frequentSorted.length && frequentSorted[g] === v) continue;
    }
    rare[r++] = i;
  }
  return { size: n, frequent, frequentCounts, rare };
}

/**
 * Draws the count of each frequent value for one resample into `out` (in `frequent` order)
 * and returns how many draws are left for the rare observations.
 */
export function drawFrequentCounts(groups: ResampleGroups, rng: Xoshiro128, out: Float64Array): number {
  let trials = groups.size;
  let mass = groups.size;
  for (let g = 0; g < groups.frequent.length; g++) {
    const c = groups.frequentCounts[g];
    const k = trials === 0 ? 0 : binomialSample(rng, trials, Math.min(1, c / mass));
    out[g] = k;
    trials -= k;
    mass -= c;
  }
  return trials;
}
