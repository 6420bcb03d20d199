import { InputError } from '../errors.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { checkPolicyFits } from './policy-chain.js';
import { startDistribution } from './start-distribution.js';

/** Relative size of the remaining steps below which the recursion stops and widens instead. */
const TAIL_TOLERANCE = 1e-13;

/**
 * The exact smallest and largest return G = Σ_{t<T} γ^t r_t of any episode of at most H steps
 * that has positive probability, starting in the start support. Intervals that need a range
 * for the return (Hoeffding, empirical Bernstein, betting) are tightest with these.
 *
 * Dynamic programming over the horizon (Bellman's principle, applied to min and max instead of
 * the mean; common practice): low_0 = high_0 = 0,
 *   low_h(s)  = min over actions a with π(a|s) > 0 (all actions when `policy` is null) and
 *               outcomes with p > 0 of r + γ low_{h−1}(s'), and likewise high_h with max;
 * terminal states contribute 0. Since γ ≥ 0 the extremes of the continuation are the
 * extremes of the whole.
 *
 * Stops early when a step changes nothing (no later step would), or, for γ < 1, when the
 * remaining H − h steps can add at most 1e-13 of the bounds' size: the tail then lies in
 * γ^h·[min(0, rmin·S), max(0, rmax·S)], S = Σ_{t<H−h} γ^t, and the bounds are widened by it,
 * so they stay valid.
 */
export function returnBounds(mdp: FiniteMdp, policy: PolicyMatrix | null, start?: number): [number, number] {
  checkPolicyFits(mdp, policy);
  const gamma = mdp.discount;
  const horizon = mdp.horizon;
  if (!Number.isInteger(horizon) || horizon < 0) {
    throw new InputError('horizon', `must be a whole number ≥ 0, got ${horizon}`);
  }
  const mu = startDistribution(mdp, start);
  const { liveStates, rowStart, next, rewardLow, rewardHigh, rewardMin, rewardMax } = reachableOutcomes(mdp, policy);

  // Index stateCount stands for "episode over" and stays 0.
  let low = new Float64Array(mdp.stateCount + 1);
  let high = new Float64Array(mdp.stateCount + 1);
  let nextLow = new Float64Array(mdp.stateCount + 1);
  let nextHigh = new Float64Array(mdp.stateCount + 1);
  let tailLow = 0;
  let tailHigh = 0;
  for (let h = 1; h <= horizon; h++) {
    const changed = boundStep(liveStates, rowStart, next, rewardLow, rewardHigh, gamma, low, high, nextLow, nextHigh);
    [low, nextLow] = [nextLow, low];
    [high, nextHigh] = [nextHigh, high];
    if (!changed) break;
    if (gamma < 1 && h < horizon) {
      const weight = Math.pow(gamma, h) * (1 - Math.pow(gamma, horizon - h)) / (1 - gamma);
      tailLow = weight * Math.min(0, rewardMin);
      tailHigh = weight * Math.max(0, rewardMax);
      if (tailHigh - tailLow <= TAIL_TOLERANCE * Math.max(1, largestAbs(low), largestAbs(high))) break;
      tailLow = 0;
      tailHigh = 0;
    }
  }

  let lowest = Infinity;
  let highest = -Infinity;
  for (let s = 0; s < mdp.stateCount; s++) {
    if (!(mu[s] > 0)) continue;
    lowest = Math.min(lowest, low[s] + (mdp.terminal[s] !== 0 ? 0 : tailLow));
    highest = Math.max(highest, high[s] + (mdp.terminal[s] !== 0 ? 0 : tailHigh));
  }
  return [lowest, highest];
}

interface ReachableOutcomes {
  readonly liveStates: Int32Array;
  /** Per state, its distinct successors (over the allowed actions) in rowStart[s] .. rowStart[s + 1]. */
  readonly rowStart: Int32Array;
  /** Next state, or stateCount when the outcome ends the episode. */
  readonly next: Int32Array;
  /** Smallest and largest reward of the outcomes reaching that successor. */
  readonly rewardLow: Float64Array;
  readonly rewardHigh: Float64Array;
  readonly rewardMin: number;
  readonly rewardMax: number;
}

/**
 * The successors reachable with positive probability under the allowed actions, one entry per
 * (state, successor) with the extreme rewards of the outcomes that reach it: only those
 * matter to a min or a max, and merging them cuts the work per step several-fold when many
 * actions share successors (gridworlds).
 */
function reachableOutcomes(mdp: FiniteMdp, policy: PolicyMatrix | null): ReachableOutcomes {
  const { stateCount, actionCount, terminal, outcomeStart, outcomeNext, outcomeProbability, outcomeReward } = mdp;
  const live: number[] = [];
  const rowStart = new Int32Array(stateCount + 1);
  const next: number[] = [];
  const rewardLow: number[] = [];
  const rewardHigh: number[] = [];
  const slot = new Int32Array(stateCount + 1).fill(-1);
  let rewardMin = Infinity;
  let rewardMax = -Infinity;
  for (let s = 0; s < stateCount; s++) {
    if (terminal[s] === 0) {
      live.push(s);
      for (let a = 0; a < actionCount; a++) {
        const sa = s * actionCount + a;
        if (policy !== null && !(policy.probability[sa] > 0)) continue;
        for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) {
          if (!(outcomeProbability[k] > 0)) continue;
          const to = terminal[outcomeNext[k]] !== 0 ? stateCount : outcomeNext[k];
          const r = outcomeReward[k];
          rewardMin = Math.min(rewardMin, r);
          rewardMax = Math.max(rewardMax, r);
          const e = slot[to];
          if (e < 0) {
            slot[to] = next.length;
            next.push(to);
            rewardLow.push(r);
            rewardHigh.push(r);
          } else {
            rewardLow[e] = Math.min(rewardLow[e], r);
            rewardHigh[e] = Math.max(rewardHigh[e], r);
          }
        }
      }
      if (next.length === rowStart[s]) {
        throw new InputError(mdp.stateNames[s] ?? `state ${s}`, 'has no action with any outcome, so an episode cannot continue');
      }
      for (let e = rowStart[s]; e < next.length; e++) slot[next[e]] = -1;
    }
    rowStart[s + 1] = next.length;
  }
  return {
    liveStates: Int32Array.from(live),
    rowStart,
    next: Int32Array.from(next),
    rewardLow: Float64Array.from(rewardLow),
    rewardHigh: Float64Array.from(rewardHigh),
    rewardMin,
    rewardMax,
  };
}

/** One step of the min/max recursion; returns whether any bound moved. */
function boundStep(
  liveStates: Int32Array,
  rowStart: Int32Array,
  next: Int32Array,
  rewardLow: Float64Array,
  rewardHigh: Float64Array,
  gamma: number,
  low: Float64Array,
  high: Float64Array,
  nextLow: Float64Array,
  nextHigh: Float64Array,
): boolean {
  let changed = false;
  for (let i = 0; i < liveStates.length; i++) {
    const s = liveStates[i];
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = rowStart[s], end = rowStart[s + 1]; k < end; k++) {
      const j = next[k];
      const candidateLow = rewardLow[k] + gamma * low[j];
      const candidateHigh = rewardHigh[k] + gamma * high[j];
      if (candidateLow < lo) lo = candidateLow;
      if (candidateHigh > hi) hi = candidateHigh;
    }
    if (lo !== low[s] || hi !== high[s]) changed = true;
    nextLow[s] = lo;
    nextHigh[s] = hi;
  }
  return changed;
}

function largestAbs(x: Float64Array): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i]));
  return m;
}

/**
 * Return range for a code environment that declares only a per-step reward range
 * [rmin, rmax]: an episode may end after any step from 1 to H, so
 *   low  = rmin ≥ 0 ? rmin : rmin Σ_{t<H} γ^t,   high = rmax ≤ 0 ? rmax : rmax Σ_{t<H} γ^t
 * (geometric series; docs/methods.md §3, eq. 3.1). A horizon of 0 allows no reward at all.
 */
export function moduleReturnBounds(
  rewardRange: readonly [number, number],
  discount: number,
  horizon: number,
): [number, number] {
  const [rmin, rmax] = rewardRange;
  if (!(rmin <= rmax)) throw new InputError('reward range', `needs min ≤ max, got [${rmin}, ${rmax}]`);
  if (!(discount >= 0 && discount <= 1)) throw new InputError('discount', `must lie in [0, 1], got ${discount}`);
  if (!(horizon >= 0)) throw new InputError('horizon', `must be ≥ 0, got ${horizon}`);
  if (horizon === 0) return [0, 0];
  const discountSum = discount === 1 ? horizon : (1 - Math.pow(discount, horizon)) / (1 - discount);
  const low = rmin >= 0 ? rmin : rmin * discountSum;
  const high = rmax <= 0 ? rmax : rmax * discountSum;
  return [low, high];
}
