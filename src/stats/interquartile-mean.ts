import { InputError } from '../errors.js';

/**
 * Interquartile mean: the mean of the middle half of the sorted scores, a 25% trimmed mean
 * (Agarwal et al. 2021, NeurIPS, "Deep Reinforcement Learning at the Edge of the Statistical
 * Precipice"; docs/methods.md §8.5). Less swayed by a few extreme episodes than the mean, more
 * efficient than the median. As SciPy's trim_mean(x, 0.25) does, ⌊n/4⌋ scores are cut from each
 * end, so for n not a multiple of 4 slightly more than half is kept.
 */
export function interquartileMean(values: Float64Array | number[]): number {
  const n = values.length;
  if (n === 0) throw new InputError('returns', 'no returns for an interquartile mean');
  const sorted = Float64Array.from(values).sort();
  return trimmedMeanOfSorted(sorted);
}

/** The 25% trimmed mean of values already sorted ascending (the bootstrap reuses its buffer). */
export function trimmedMeanOfSorted(sorted: Float64Array): number {
  const n = sorted.length;
  const cut = Math.floor(n / 4);
  let sum = 0;
  for (let i = cut; i < n - cut; i++) sum += sorted[i];
  return sum / (n - 2 * cut);
}

/**
 * The same 25% trimmed mean of a sample given as counts over its ascending distinct values
 * (`total` = Σ counts): the ⌊total/4⌋ lowest and highest observations are cut, and the
 * rest summed a value at a time, so a bootstrap resample needs no sort.
 */
export function trimmedMeanOfCounts(values: Float64Array, counts: Float64Array, total: number): number {
  const cut = Math.floor(total / 4);
  const keepFrom = cut;
  const keepTo = total - cut; // positions [keepFrom, keepTo) of the sorted sample are kept
  let position = 0;
  let sum = 0;
  for (let d = 0; d < values.length && position < keepTo; d++) {
    const c = counts[d];
    if (c === 0) continue;
    const from = Math.max(position, keepFrom);
    const to = Math.min(position + c, keepTo);
    if (to > from) sum += (to - from) * values[d];
    position += c;
  }
  return sum / (keepTo - keepFrom);
}
