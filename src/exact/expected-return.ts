import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { horizonValues } from './horizon-values.js';
import { startDistribution } from './start-distribution.js';

/**
 * E[G_H]: the expected horizon-H discounted return from the start distribution (or from one
 * state), exactly what a run's episodes estimate, so a report can print it beside the
 * estimate. The horizon recursion alone (Sutton & Barto 2018, eq. 4.5, started from 0;
 * docs/methods.md §9), without the untruncated solve `exactEvaluation` adds, so its cost is
 * that of the return bounds every finite run already computes.
 */
export function expectedReturn(mdp: FiniteMdp, policy: PolicyMatrix, start?: number): number {
  const mu = startDistribution(mdp, start);
  const { value } = horizonValues(mdp, policy, mdp.horizon);
  let total = 0;
  for (let s = 0; s < mdp.stateCount; s++) if (mu[s] > 0) total += mu[s] * value[s];
  return total;
}
