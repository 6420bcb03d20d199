import { InputError } from '../errors.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { buildPolicyChain } from './policy-chain.js';

export interface HorizonValues {
  /** V_H(s): expected discounted return of at most H rewards starting in s (0 on terminals). */
  readonly value: Float64Array;
  /** E[G_H² | s], for the exact return variance. */
  readonly secondMoment: Float64Array;
}

/**
 * The horizon-H value and second moment of the return, by backward recursion over H steps,
 * which is exactly what Monte Carlo rollouts truncated at H sample:
 *   V_0 = 0,  V_h(s) = Σ_a π Σ_k p (r + γ V_{h−1}(s')),
 *   M_0 = 0,  M_h(s) = Σ_a π Σ_k p [r² + 2γ r V_{h−1}(s') + γ² M_{h−1}(s')],
 * with V and M zero on terminal states (METHODS §8; the synchronous sweep of Sutton & Barto
 * 2018, eq. 4.5, started from 0; the second-moment recursion expands E[(r + γG')²] using the
 * Markov property).
 *
 * Cost H × (policy-weighted edges), two double-buffered vectors, nothing allocated per step.
 * When a step reproduces the previous vectors bit for bit, every later step would too, so the
 * loop stops there: the result is identical to running all H steps.
 */
export function horizonValues(mdp: FiniteMdp, policy: PolicyMatrix, horizon: number = mdp.horizon): HorizonValues {
  if (!Number.isInteger(horizon) || horizon < 0) {
    throw new InputError('horizon', `must be a whole number ≥ 0, got ${horizon}`);
  }
  const chain = buildPolicyChain(mdp, policy);
  const { liveStates, rowStart, edgeNext, edgeWeight, edgeWeightedReward, meanReward, meanSquaredReward } = chain;
  const gamma = mdp.discount;

  // Per-edge coefficients, so the inner loop is three multiply-adds.
  const edgeCount = edgeNext.length;
  const valueCoef = new Float64Array(edgeCount);
  const crossCoef = new Float64Array(edgeCount);
  const momentCoef = new Float64Array(edgeCount);
  for (let e = 0; e < edgeCount; e++) {
    valueCoef[e] = gamma * edgeWeight[e];
    crossCoef[e] = 2 * gamma * edgeWeightedReward[e];
    momentCoef[e] = gamma * gamma * edgeWeight[e];
  }

  let value = new Float64Array(mdp.stateCount);
  let moment = new Float64Array(mdp.stateCount);
  let nextValue = new Float64Array(mdp.stateCount);
  let nextMoment = new Float64Array(mdp.stateCount);
  for (let h = 0; h < horizon; h++) {
    let changed = false;
    for (let i = 0; i < liveStates.length; i++) {
      const s = liveStates[i];
      let v = meanReward[s];
      let m = meanSquaredReward[s];
      for (let e = rowStart[s], end = rowStart[s + 1]; e < end; e++) {
        const j = edgeNext[e];
        const vj = value[j];
        v += valueCoef[e] * vj;
        m += crossCoef[e] * vj + momentCoef[e] * moment[j];
      }
      if (v !== value[s] || m !== moment[s]) changed = true;
      nextValue[s] = v;
      nextMoment[s] = m;
    }
    [value, nextValue] = [nextValue, value];
    [moment, nextMoment] = [nextMoment, moment];
    if (!changed) break;
  }
  return { value, secondMoment: moment };
}
