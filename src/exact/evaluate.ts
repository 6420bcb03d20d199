import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { horizonValues } from './horizon-values.js';
import { infiniteValues } from './infinite-values.js';
import { startDistribution } from './start-distribution.js';

/** The exact answer that Monte Carlo estimates are checked against. */
export interface ExactResult {
  /** E[G_H] from the start distribution: what `estimate` samples. */
  value: number;
  /** Standard deviation of G_H from the start distribution. */
  std: number;
  /** V_H per state. */
  states: Float64Array;
  /** E[G] without truncation, or null when some start state has no finite value (γ = 1, episode may never end). */
  value_infinite: number | null;
  /** V_∞ per state, NaN where it does not exist. */
  states_infinite: Float64Array;
  horizon: number;
  discount: number;
}

export interface ExactOptions {
  /** Start in this state index instead of the environment's start distribution. */
  start?: number;
}

/**
 * Exact evaluation of a policy on a finite MDP (docs/methods.md §9): the horizon-H value and return
 * variance by backward recursion, and the untruncated value by a linear solve. Averaging over
 * the start distribution μ uses the law of total variance in the form
 * Var G = Σ_s μ(s) E[G² | s] − (Σ_s μ(s) V(s))².
 */
export function exactEvaluation(mdp: FiniteMdp, policy: PolicyMatrix, options: ExactOptions = {}): ExactResult {
  const mu = startDistribution(mdp, options.start);
  const truncated = horizonValues(mdp, policy, mdp.horizon);
  const untruncated = infiniteValues(mdp, policy);

  let value = 0;
  let secondMoment = 0;
  let valueInfinite: number | null = 0;
  for (let s = 0; s < mdp.stateCount; s++) {
    const weight = mu[s];
    if (!(weight > 0)) continue;
    value += weight * truncated.value[s];
    secondMoment += weight * truncated.secondMoment[s];
    const vInf = untruncated[s];
    valueInfinite = valueInfinite === null || Number.isNaN(vInf) ? null : valueInfinite + weight * vInf;
  }
  return {
    value,
    std: Math.sqrt(Math.max(0, secondMoment - value * value)),
    states: truncated.value,
    value_infinite: valueInfinite,
    states_infinite: untruncated,
    horizon: mdp.horizon,
    discount: mdp.discount,
  };
}
