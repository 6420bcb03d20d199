import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import type { ActingPolicy } from '../definitions/built.js';
import { PluginError } from '../errors.js';
import { Xoshiro128 } from './xoshiro128.js';
import { STREAM, seedStream } from './streams.js';
import type { EpisodeBlock } from './episode-block.js';

/**
 * The rollout loop over a compiled finite MDP with a tabulated policy: flat typed arrays,
 * no allocation per step or per episode. The environment draws exactly one uniform for the
 * start (when the start is random) and one per step from the ENV stream, whatever the
 * policy, so that two policies run with one seed share environment noise (common random
 * numbers). The policy draws from its own stream only in states where it is stochastic.
 */
export function rolloutFinite(
  mdp: FiniteMdp,
  policy: PolicyMatrix,
  seed: number,
  start: number,
  block: EpisodeBlock,
): number {
  const envRng = new Xoshiro128();
  const policyRng = new Xoshiro128();
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon } = mdp;
  const { cumulative, deterministicAction } = policy;
  const startStates = startSupport(mdp);
  const startCumulative = startStates.cumulative;
  const startIndex = startStates.states;
  const lastStart = startIndex.length - 1;
  const { returns, lengths, first, count } = block;
  let steps = 0;
  for (let i = 0; i < count; i++) {
    const episode = first + i;
    seedStream(envRng, seed, STREAM.ENV, episode);
    seedStream(policyRng, seed, STREAM.POLICY, episode);
    let s = start;
    if (s < 0) {
      const u = envRng.uniform();
      let k = 0;
      while (k < lastStart && u >= startCumulative[k]) k++;
      s = startIndex[k];
    }
    let g = 0;
    let weight = 1;
    let t = 0;
    if (terminal[s] === 0) {
      while (t < horizon) {
        let a = deterministicAction[s];
        if (a < 0) {
          const u = policyRng.uniform();
          const base = s * actionCount;
          a = 0;
          while (a < actionCount - 1 && u >= cumulative[base + a]) a++;
        }
        const sa = s * actionCount + a;
        let k = outcomeStart[sa];
        const last = outcomeStart[sa + 1] - 1;
        const u = envRng.uniform();
        while (k < last && u >= outcomeCumulative[k]) k++;
        g += weight * outcomeReward[k];
        weight *= discount;
        s = outcomeNext[k];
        t++;
        if (terminal[s] !== 0) break;
      }
    }
    returns[i] = g;
    lengths[i] = t;
    steps += t;
  }
  return steps;
}

/**
 * The same loop for a code policy on a finite MDP: the policy sees state names ("row,col").
 * Slower (a call per step) but exact in the same sense.
 */
export function rolloutFiniteActing(
  mdp: FiniteMdp,
  acting: ActingPolicy,
  seed: number,
  start: number,
  block: EpisodeBlock,
): number {
  const envRng = new Xoshiro128();
  const policyRng = new Xoshiro128();
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon, stateNames } = mdp;
  const startStates = startSupport(mdp);
  const lastStart = startStates.states.length - 1;
  const { returns, lengths, first, count } = block;
  let steps = 0;
  for (let i = 0; i < count; i++) {
    const episode = first + i;
    seedStream(envRng, seed, STREAM.ENV, episode);
    seedStream(policyRng, seed, STREAM.POLICY, episode);
    let s = start;
    if (s < 0) {
      const u = envRng.uniform();
      let k = 0;
      while (k < lastStart && u >= startStates.cumulative[k]) k++;
      s = startStates.states[k];
    }
    let g = 0;
    let weight = 1;
    let t = 0;
    if (terminal[s] === 0) {
      while (t < horizon) {
        let a: number;
        try {
          a = acting.act(stateNames[s], policyRng);
        } catch (e) {
          throw new PluginError('the policy', episode, t, e);
        }
        if (!(a >= 0 && a < actionCount && Number.isInteger(a))) {
          throw new PluginError('the policy', episode, t, new Error(`chose action ${String(a)}, not one of 0..${actionCount - 1}`));
        }
        const sa = s * actionCount + a;
        let k = outcomeStart[sa];
        const last = outcomeStart[sa + 1] - 1;
        const u = envRng.uniform();
        while (k < last && u >= outcomeCumulative[k]) k++;
        g += weight * outcomeReward[k];
        weight *= discount;
        s = outcomeNext[k];
        t++;
        if (terminal[s] !== 0) break;
      }
    }
    returns[i] = g;
    lengths[i] = t;
    steps += t;
  }
  return steps;
}

interface StartSupport {
  states: Int32Array;
  cumulative: Float64Array;
}

const supportCache = new WeakMap<FiniteMdp, StartSupport>();

/** The states with positive start probability and their running sum (last entry exactly 1). */
export function startSupport(mdp: FiniteMdp): StartSupport {
  const cached = supportCache.get(mdp);
  if (cached) return cached;
  const states: number[] = [];
  for (let s = 0; s < mdp.stateCount; s++) if (mdp.startProbability[s] > 0) states.push(s);
  const cumulative = new Float64Array(states.length);
  let sum = 0;
  states.forEach((s, k) => {
    sum += mdp.startProbability[s];
    cumulative[k] = sum;
  });
  cumulative[states.length - 1] = 1;
  const support = { states: Int32Array.from(states), cumulative };
  supportCache.set(mdp, support);
  return support;
}
