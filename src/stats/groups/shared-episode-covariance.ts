import { InputError } from '../../errors.js';

/**
 * The mean covariance of two different members' episode means when every member ran on the
 * same episodes (common random numbers): c̄ = (1/(K(K−1))) Σ_{k≠k'} Ĉov(Y_k·, Y_k'·)/n, from the
 * identity Σ_k Σ_k' Ĉov(Y_k, Y_k') = K² s²(Z), Z_j = (1/K) Σ_k Y_kj, so it costs one pass
 * (docs/methods.md §15.3). Zero in expectation when members run on independent episodes; under
 * common random numbers it is usually positive and must be added to the variance of a group
 * mean, which the spread of member means alone misses.
 */
export function sharedEpisodeCovariance(members: readonly (Float64Array | number[])[]): number {
  const k = members.length;
  if (k < 2) return 0;
  const n = members[0].length;
  if (members.some((m) => m.length !== n)) throw new InputError('group', 'members on common random numbers must have the same episodes');
  if (n < 2) return 0;
  const average = new Float64Array(n);
  let sumOfVariances = 0;
  for (const member of members) {
    for (let j = 0; j < n; j++) average[j] += member[j] / k;
    sumOfVariances += sampleVariance(member);
  }
  return (k * k * sampleVariance(average) - sumOfVariances) / (n * k * (k - 1));
}

/** Sample covariance (divisor n − 1) of two equally long samples. */
export function sampleCovariance(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const n = x.length;
  if (n < 2) return 0;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let s = 0;
  for (let i = 0; i < n; i++) s += (x[i] - mx) * (y[i] - my);
  return s / (n - 1);
}

/** Sample variance (divisor n − 1), two-pass. */
export function sampleVariance(x: ArrayLike<number>): number {
  return sampleCovariance(x, x);
}

/** Z_j = (1/K) Σ_k Y_kj: each episode's return averaged over the members. */
export function episodeAverages(members: readonly (Float64Array | number[])[]): Float64Array {
  const n = members[0].length;
  const out = new Float64Array(n);
  for (const member of members) for (let j = 0; j < n; j++) out[j] += member[j] / members.length;
  return out;
}
