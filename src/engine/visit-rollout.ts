import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import type { ActingPolicy } from '../definitions/built.js';
import { checkedAction } from './checked-action.js';
import type { EpisodeBlock } from './episode-block.js';
import { firstAbove, startSupport, type RolloutTables } from './finite-rollout.js';
import { Threefry20 } from './threefry.js';
import { PURPOSE, VisitPolicyRng, keyVisitNoise, visitCountsFor } from './visit-noise.js';

/** 2^-32: 32 random bits to a uniform double in [0, 1). */
const TO_UNIT = 2.3283064365386963e-10;

/**
 * The rollout loop of `--noise visit` for a tabulated policy: at the k-th visit of state s
 * the policy's uniform and the environment's are words 1 and 0 of one Threefry block keyed
 * by (seed, episode) at counter (s, k) (engine/visit-noise.ts). Two policies that reach s
 * for the k-th time see the same uniforms there, whatever they did before, so close policies
 * stay coupled after their trajectories part (common random numbers by state).
 *
 * A block is computed only when a draw is needed (a stochastic policy state, or an action with
 * more than one outcome): skipping one changes no other draw, because draws are addressed, not
 * consumed in order. No allocation per step or per episode.
 */
export function rolloutFiniteVisit(
  mdp: RolloutTables,
  policy: PolicyMatrix,
  seed: number,
  start: number,
  block: EpisodeBlock,
): number {
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon } = mdp;
  const { cumulative, deterministicAction } = policy;
  const support = startSupport(mdp);
  const lastStart = support.states.length - 1;
  const lastAction = actionCount - 1;
  const visits = visitCountsFor(mdp, mdp.stateCount);
  const count = visits.count;
  const stamp = visits.stamp;
  const g = new Threefry20();
  const { returns, lengths, finals, first } = block;
  let steps = 0;
  for (let i = 0; i < block.count; i++) {
    const episode = first + i;
    keyVisitNoise(g, seed, episode);
    const epoch = visits.nextEpisode();
    let s = start;
    if (s < 0) {
      g.draw(0, 0, PURPOSE.START, 0);
      s = support.states[firstAbove(support.cumulative, support.guide, (g.out0 >>> 0) * TO_UNIT, lastStart)];
    }
    let ret = 0;
    let weight = 1;
    let t = 0;
    if (terminal[s] === 0) {
      while (t < horizon) {
        let k = 0;
        if (stamp[s] === epoch) k = ++count[s];
        else {
          stamp[s] = epoch;
          count[s] = 0;
        }
        const base = s * actionCount;
        let drawn = false;
        let a = deterministicAction[s];
        if (a < 0) {
          g.draw(s, k, PURPOSE.VISIT, 0);
          drawn = true;
          const u = (g.out1 >>> 0) * TO_UNIT;
          let j = base;
          const end = base + lastAction;
          while (j < end && u >= cumulative[j]) j++;
          a = j - base;
        }
        const sa = base + a;
        let o = outcomeStart[sa];
        const last = outcomeStart[sa + 1] - 1;
        if (o < last) {
          if (!drawn) g.draw(s, k, PURPOSE.VISIT, 0);
          const u = (g.out0 >>> 0) * TO_UNIT;
          while (o < last && u >= outcomeCumulative[o]) o++;
        }
        ret += weight * outcomeReward[o];
        weight *= discount;
        s = outcomeNext[o];
        t++;
        if (terminal[s] !== 0) break;
      }
    }
    returns[i] = ret;
    lengths[i] = t;
    finals[i] = s;
    steps += t;
  }
  return steps;
}

/**
 * The same loop for a code policy on a finite MDP: at each visit the policy is handed a
 * generator whose draws are keyed by that visit (VisitPolicyRng), the environment draws word 0.
 */
export function rolloutFiniteActingVisit(
  mdp: FiniteMdp,
  acting: ActingPolicy,
  seed: number,
  start: number,
  block: EpisodeBlock,
): number {
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon, stateNames } = mdp;
  const support = startSupport(mdp);
  const lastStart = support.states.length - 1;
  const visits = visitCountsFor(mdp, mdp.stateCount);
  const g = new Threefry20();
  const policyRng = new VisitPolicyRng();
  const { returns, lengths, finals, first } = block;
  let steps = 0;
  for (let i = 0; i < block.count; i++) {
    const episode = first + i;
    keyVisitNoise(g, seed, episode);
    policyRng.key(seed, episode);
    const epoch = visits.nextEpisode();
    let s = start;
    if (s < 0) {
      g.draw(0, 0, PURPOSE.START, 0);
      s = support.states[firstAbove(support.cumulative, support.guide, (g.out0 >>> 0) * TO_UNIT, lastStart)];
    }
    let ret = 0;
    let weight = 1;
    let t = 0;
    if (terminal[s] === 0) {
      while (t < horizon) {
        let k = 0;
        if (visits.stamp[s] === epoch) k = ++visits.count[s];
        else {
          visits.stamp[s] = epoch;
          visits.count[s] = 0;
        }
        policyRng.at(s, k);
        const a = checkedAction(acting, stateNames[s], policyRng, actionCount, episode, t);
        const sa = s * actionCount + a;
        let o = outcomeStart[sa];
        const last = outcomeStart[sa + 1] - 1;
        g.draw(s, k, PURPOSE.VISIT, 0);
        const u = (g.out0 >>> 0) * TO_UNIT;
        while (o < last && u >= outcomeCumulative[o]) o++;
        ret += weight * outcomeReward[o];
        weight *= discount;
        s = outcomeNext[o];
        t++;
        if (terminal[s] !== 0) break;
      }
    }
    returns[i] = ret;
    lengths[i] = t;
    finals[i] = s;
    steps += t;
  }
  return steps;
}
