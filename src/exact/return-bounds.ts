import { InputError } from '../errors.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { checkPolicyFits } from './policy-chain.js';
import { startDistribution } from './start-distribution.js';

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
 * extremes of the whole. Stops early when a step changes nothing (then no later step would).
 */
export function returnBounds(mdp: FiniteMdp, policy: PolicyMatrix | null, start?: number): [number, number] {
  checkPolicyFits(mdp, policy);
  const { stateCount, actionCount, terminal, outcomeStart, outcomeNext, outcomeProbability, outcomeReward } = mdp;
  const gamma = mdp.discount;
  const horizon = mdp.horizon;
  const mu = startDistribution(mdp, start);

  let low = new Float64Array(stateCount);
  let high = new Float64Array(stateCount);
  let nextLow = new Float64Array(stateCount);
  let nextHigh = new Float64Array(stateCount);
  for (let h = 0; h < horizon; h++) {
    let changed = false;
    for (let s = 0; s < stateCount; s++) {
      if (terminal[s] !== 0) continue;
      let lo = Infinity;
      let hi = -Infinity;
      for (let a = 0; a < actionCount; a++) {
        const sa = s * actionCount + a;
        if (policy !== null && !(policy.probability[sa] > 0)) continue;
        for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) {
          if (!(outcomeProbability[k] > 0)) continue;
          const next = outcomeNext[k];
          const r = outcomeReward[k];
          const continuationLow = terminal[next] !== 0 ? 0 : low[next];
          const continuationHigh = terminal[next] !== 0 ? 0 : high[next];
          lo = Math.min(lo, r + gamma * continuationLow);
          hi = Math.max(hi, r + gamma * continuationHigh);
        }
      }
      if (lo === Infinity) {
        throw new InputError(mdp.stateNames[s] ?? `state ${s}`, 'has no action with any outcome, so an episode cannot continue');
      }
      if (lo !== low[s] || hi !== high[s]) changed = true;
      nextLow[s] = lo;
      nextHigh[s] = hi;
    }
    [low, nextLow] = [nextLow, low];
    [high, nextHigh] = [nextHigh, high];
    if (!changed) break;
  }

  let lowest = Infinity;
  let highest = -Infinity;
  for (let s = 0; s < stateCount; s++) {
    if (!(mu[s] > 0)) continue;
    lowest = Math.min(lowest, low[s]);
    highest = Math.max(highest, high[s]);
  }
  return [lowest, highest];
}

/**
 * Return range for a code environment that declares only a per-step reward range
 * [rmin, rmax]: an episode may end after any step from 1 to H, so
 *   low  = rmin ≥ 0 ? rmin : rmin Σ_{t<H} γ^t,   high = rmax ≤ 0 ? rmax : rmax Σ_{t<H} γ^t
 * (geometric series; METHODS §1). A horizon of 0 allows no reward at all.
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
