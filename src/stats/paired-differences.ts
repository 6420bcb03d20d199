import { InputError } from '../errors.js';

/**
 * D_i = first_i − second_i for returns of two policies run on the same episode indices (common
 * random numbers: the pairs are independent across episodes; docs/methods.md §8.1). Refuses samples of
 * different lengths, which cannot be paired.
 */
export function pairedDifferences(first: Float64Array | number[], second: Float64Array | number[]): Float64Array {
  requireSamePairs(first, second);
  const out = new Float64Array(first.length);
  for (let i = 0; i < first.length; i++) out[i] = first[i] - second[i];
  return out;
}

/** Paired methods need one return of each policy per episode index. */
export function requireSamePairs(first: ArrayLike<number>, second: ArrayLike<number>): void {
  if (first.length !== second.length) {
    throw new InputError('returns', `paired comparison needs the same episodes for both policies (got ${first.length} and ${second.length})`);
  }
}
