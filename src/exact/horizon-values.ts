import { InputError } from '../errors.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { buildPolicyChain } from './policy-chain.js';

export interface HorizonValues {
  /** V_H(s): expected discounted return of at most H rewards starting in s (0 on terminals). */
  readonly value: Float64Array;
  /** E[G_H² | s], for the exact return variance. */
  readonly secondMoment: Float64Array;
}

/** Relative size of the remaining H − h steps below which the recursion may stop early. */
const TAIL_TOLERANCE = 1e-13;

/**
 * The horizon-H value and second moment of the return, by backward recursion over H steps,
 * which is exactly what Monte Carlo rollouts truncated at H sample:
 *   V_0 = 0,  V_h(s) = Σ_a π Σ_k p (r + γ V_{h−1}(s')),
 *   M_0 = 0,  M_h(s) = Σ_a π Σ_k p [r² + 2γ r V_{h−1}(s') + γ² M_{h−1}(s')],
 * with V and M zero on terminal states (docs/methods.md §9; the synchronous sweep of Sutton & Barto
 * 2018, eq. 4.5, started from 0; the second-moment recursion expands E[(r + γG')²] using the
 * Markov property).
 *
 * Cost H × (policy-weighted edges) with double-buffered vectors and nothing allocated per
 * step. Two ways to stop before H:
 * - a step that reproduces the previous vectors bit for bit: every later step would too, so
 *   the result is identical;
 * - a provable tail bound (see {@link tailBounds}): once the remaining steps can move no
 *   value or second moment by more than 1e-13 of its size, they are skipped. This is what
 *   keeps long derived horizons (γ = 0.9999 → H ≈ 10^5) fast on chains where episodes end.
 */
export function horizonValues(mdp: FiniteMdp, policy: PolicyMatrix, horizon: number = mdp.horizon): HorizonValues {
  if (!Number.isInteger(horizon) || horizon < 0) {
    throw new InputError('horizon', `must be a whole number ≥ 0, got ${horizon}`);
  }
  const chain = buildPolicyChain(mdp, policy);
  const { liveStates, rowStart, edgeNext, edgeWeight, edgeWeightedReward, meanReward, meanSquaredReward } = chain;
  const gamma = mdp.discount;
  const n = mdp.stateCount;

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

  let value = new Float64Array(n);
  let moment = new Float64Array(n);
  let nextValue = new Float64Array(n);
  let nextMoment = new Float64Array(n);
  const change = new Float64Array(4); // max |ΔV|, max |ΔM|, max |V|, max |M| of the last sweep

  // Contraction tracking: unit_k = (γQ)^k 1 until its largest entry is ≤ 1/2 (k = blockLength).
  // Not worth it when the block would be too long for the tail bound to pay off before H.
  const trackLimit = Math.floor(horizon / 16);
  let tracking = trackLimit > 0;
  let unit = new Float64Array(tracking ? n : 0);
  let nextUnit = new Float64Array(tracking ? n : 0);
  if (tracking) for (const s of liveStates) unit[s] = 1;
  let blockLength = 0;
  let blockFactor = 1;

  for (let h = 1; h <= horizon; h++) {
    sweep(liveStates, rowStart, edgeNext, valueCoef, crossCoef, momentCoef, meanReward, meanSquaredReward, value, moment, nextValue, nextMoment, change);
    [value, nextValue] = [nextValue, value];
    [moment, nextMoment] = [nextMoment, moment];
    if (change[0] === 0 && change[1] === 0) break;

    if (tracking) {
      blockFactor = sweepUnit(liveStates, rowStart, edgeNext, valueCoef, unit, nextUnit);
      [unit, nextUnit] = [nextUnit, unit];
      if (blockFactor <= 0.5) blockLength = h;
      if (blockLength > 0 || h >= trackLimit) tracking = false;
    }
    if (blockLength > 0 && h < horizon) {
      const [valueTail, momentTail] = tailBounds(change[0], change[1], chain.maxAbsReward, blockLength, blockFactor);
      if (valueTail <= TAIL_TOLERANCE * Math.max(1, change[2]) && momentTail <= TAIL_TOLERANCE * Math.max(1, change[3])) break;
    }
  }
  return { value, secondMoment: moment };
}

/**
 * Bounds on |V_H − V_h| and |M_H − M_h| from the last increments a = ‖V_h − V_{h−1}‖∞ and
 * b = ‖M_h − M_{h−1}‖∞, when ‖(γQ)^m 1‖∞ ≤ ρ (Q: P_π among non-terminal states).
 * The increments obey ΔV_{h+k} = γQ ΔV_{h+k−1} and ΔM_{h+k} = 2γW ΔV_{h+k−1} + γ²Q ΔM_{h+k−1}
 * with |W| ≤ R·Q (R = max |r|), so by induction |ΔV| ≤ a(γQ)^k 1 and
 * |ΔM| ≤ (b + 2kRa)(γQ)^k 1; with (γQ)^k 1 ≤ ρ^⌊k/m⌋ the sums over k are
 *   |V_H − V_h| ≤ a m/(1 − ρ),   |M_H − M_h| ≤ b m/(1 − ρ) + 2Ra m²/(1 − ρ)²
 * (derived here; the same block-contraction argument as in infinite-values.ts).
 */
function tailBounds(a: number, b: number, maxAbsReward: number, m: number, rho: number): [number, number] {
  const geometric = m / (1 - rho);
  return [a * geometric, b * geometric + 2 * maxAbsReward * a * geometric * geometric];
}

/** One backward step for every live state; writes the step's sizes into `change`. */
function sweep(
  liveStates: Int32Array,
  rowStart: Int32Array,
  edgeNext: Int32Array,
  valueCoef: Float64Array,
  crossCoef: Float64Array,
  momentCoef: Float64Array,
  meanReward: Float64Array,
  meanSquaredReward: Float64Array,
  value: Float64Array,
  moment: Float64Array,
  nextValue: Float64Array,
  nextMoment: Float64Array,
  change: Float64Array,
): void {
  let dv = 0;
  let dm = 0;
  let bigV = 0;
  let bigM = 0;
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
    // NaN (overflow) compares false and counts as a change, so it never stops the loop early.
    const stepV = Math.abs(v - value[s]);
    const stepM = Math.abs(m - moment[s]);
    dv = stepV > dv || stepV !== stepV ? stepV : dv;
    dm = stepM > dm || stepM !== stepM ? stepM : dm;
    bigV = Math.max(bigV, Math.abs(v));
    bigM = Math.max(bigM, Math.abs(m));
    nextValue[s] = v;
    nextMoment[s] = m;
  }
  change[0] = dv;
  change[1] = dm;
  change[2] = bigV;
  change[3] = bigM;
}

/** unit ← γQ·unit; returns its largest entry. */
function sweepUnit(
  liveStates: Int32Array,
  rowStart: Int32Array,
  edgeNext: Int32Array,
  valueCoef: Float64Array,
  unit: Float64Array,
  nextUnit: Float64Array,
): number {
  let largest = 0;
  for (let i = 0; i < liveStates.length; i++) {
    const s = liveStates[i];
    let u = 0;
    for (let e = rowStart[s], end = rowStart[s + 1]; e < end; e++) u += valueCoef[e] * unit[edgeNext[e]];
    nextUnit[s] = u;
    if (u > largest) largest = u;
  }
  return largest;
}
