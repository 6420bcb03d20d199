import { InputError } from '../errors.js';
import type { FiniteMdp } from '../definitions/finite-mdp.js';

/**
 * The distribution an evaluation starts from: the environment's own, or all mass on `start`
 * (a state index) when given.
 */
export function startDistribution(mdp: FiniteMdp, start?: number): Float64Array {
  if (start === undefined) return mdp.startProbability;
  if (!Number.isInteger(start) || start < 0 || start >= mdp.stateCount) {
    throw new InputError('start', `must be a state index in 0..${mdp.stateCount - 1}, got ${start}`);
  }
  const mu = new Float64Array(mdp.stateCount);
  mu[start] = 1;
  return mu;
}
