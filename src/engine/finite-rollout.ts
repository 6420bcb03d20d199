import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import type { ActingPolicy } from '../definitions/built.js';
import { checkedAction } from './checked-action.js';
import { pluginClock } from './plugin-clock.js';
import { Xoshiro128 } from './xoshiro128.js';
import { pluginRngs } from './episode-rng.js';
import { STREAM, seedStream, streamWords } from './streams.js';
import type { EpisodeBlock } from './episode-block.js';

/** The parts of a compiled finite MDP that the rollout loop reads (all a worker thread needs). */
export type RolloutTables = Pick<
  FiniteMdp,
  | 'stateCount'
  | 'actionCount'
  | 'terminal'
  | 'startProbability'
  | 'outcomeStart'
  | 'outcomeNext'
  | 'outcomeCumulative'
  | 'outcomeReward'
  | 'discount'
  | 'horizon'
>;

/** The rollout tables of `mdp` alone, without names or maps: cheap to send to a worker thread. */
export function rolloutTables(mdp: RolloutTables): RolloutTables {
  const { stateCount, actionCount, terminal, startProbability, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, discount, horizon } = mdp;
  return { stateCount, actionCount, terminal, startProbability, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, discount, horizon };
}

/** 2^-32: 32 random bits to a uniform double in [0, 1), exactly as Xoshiro128.uniform. */
const TO_UNIT = 2.3283064365386963e-10;

/**
 * The rollout loop over a compiled finite MDP with a tabulated policy: flat typed arrays,
 * no allocation per step or per episode. The environment draws exactly one uniform for the
 * start (when the start is random) and one per step from the ENV stream, whatever the
 * policy, so that two policies run with one seed share environment noise (common random
 * numbers). The policy draws from its own stream only in states where it is stochastic.
 *
 * Speed: both generators live in local variables (the xoshiro128** step of Xoshiro128.uint32
 * is written out where a uniform is drawn), the POLICY stream is seeded only in episodes
 * that draw from it, and the start state is found through a guide table. None of this changes a
 * draw: results are bit-identical to the plain loop over Xoshiro128 objects.
 */
export function rolloutFinite(
  mdp: RolloutTables,
  policy: PolicyMatrix,
  seed: number,
  start: number,
  block: EpisodeBlock,
): number {
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon } = mdp;
  const { cumulative, deterministicAction } = policy;
  const startStates = startSupport(mdp);
  const startCumulative = startStates.cumulative;
  const startGuide = startStates.guide;
  const startIndex = startStates.states;
  const lastStart = startIndex.length - 1;
  const lastAction = actionCount - 1;
  const { returns, lengths, finals, first, count } = block;
  const words = new Int32Array(4);
  let steps = 0;
  for (let i = 0; i < count; i++) {
    const episode = first + i;
    streamWords(seed, STREAM.ENV, episode, words);
    let e0 = words[0];
    let e1 = words[1];
    let e2 = words[2];
    let e3 = words[3];
    // The POLICY stream, seeded on its first use in the episode.
    let p0 = 0;
    let p1 = 0;
    let p2 = 0;
    let p3 = 0;
    let policySeeded = false;
    let s = start;
    if (s < 0) {
      const x = Math.imul(e1, 5);
      const u = (Math.imul((x << 7) | (x >>> 25), 9) >>> 0) * TO_UNIT;
      const shifted = e1 << 9;
      e2 ^= e0;
      e3 ^= e1;
      e1 ^= e2;
      e0 ^= e3;
      e2 ^= shifted;
      e3 = (e3 << 11) | (e3 >>> 21);
      s = startIndex[firstAbove(startCumulative, startGuide, u, lastStart)];
    }
    let g = 0;
    let weight = 1;
    let t = 0;
    if (terminal[s] === 0) {
      while (t < horizon) {
        const base = s * actionCount;
        let a = deterministicAction[s];
        if (a < 0) {
          if (!policySeeded) {
            streamWords(seed, STREAM.POLICY, episode, words);
            p0 = words[0];
            p1 = words[1];
            p2 = words[2];
            p3 = words[3];
            policySeeded = true;
          }
          const x = Math.imul(p1, 5);
          const u = (Math.imul((x << 7) | (x >>> 25), 9) >>> 0) * TO_UNIT;
          const shifted = p1 << 9;
          p2 ^= p0;
          p3 ^= p1;
          p1 ^= p2;
          p0 ^= p3;
          p2 ^= shifted;
          p3 = (p3 << 11) | (p3 >>> 21);
          let j = base;
          const end = base + lastAction;
          while (j < end && u >= cumulative[j]) j++;
          a = j - base;
        }
        const sa = base + a;
        let k = outcomeStart[sa];
        const last = outcomeStart[sa + 1] - 1;
        const x = Math.imul(e1, 5);
        const u = (Math.imul((x << 7) | (x >>> 25), 9) >>> 0) * TO_UNIT;
        const shifted = e1 << 9;
        e2 ^= e0;
        e3 ^= e1;
        e1 ^= e2;
        e0 ^= e3;
        e2 ^= shifted;
        e3 = (e3 << 11) | (e3 >>> 21);
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
    finals[i] = s;
    steps += t;
  }
  return steps;
}

/**
 * The first index k in [0, last] with u < cumulative[k], or last: the same answer as a linear
 * scan of the non-decreasing running sums, in constant expected time. The guide table gives,
 * for u's bucket floor(u·G), an index below which every running sum is at most u (see
 * {@link startSupport}), and the scan goes on from there.
 */
export function firstAbove(cumulative: Float64Array, guide: Int32Array, u: number, last: number): number {
  let k = guide[Math.min(guide.length - 1, Math.floor(u * guide.length))];
  while (k < last && u >= cumulative[k]) k++;
  return k;
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
  const policyRng = pluginRngs().policy;
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon, stateNames } = mdp;
  const startStates = startSupport(mdp);
  const lastStart = startStates.states.length - 1;
  const { returns, lengths, finals, first, count } = block;
  const clock = pluginClock();
  let steps = 0;
  for (let i = 0; i < count; i++) {
    const episode = first + i;
    seedStream(envRng, seed, STREAM.ENV, episode);
    seedStream(policyRng, seed, STREAM.POLICY, episode);
    clock[0] = episode;
    let s = start;
    if (s < 0) {
      s = startStates.states[firstAbove(startStates.cumulative, startStates.guide, envRng.uniform(), lastStart)];
    }
    let g = 0;
    let weight = 1;
    let t = 0;
    if (terminal[s] === 0) {
      while (t < horizon) {
        clock[1] = 2 * t;
        const a = checkedAction(acting, stateNames[s], policyRng, actionCount, episode, t);
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
    finals[i] = s;
    steps += t;
  }
  return steps;
}

interface StartSupport {
  states: Int32Array;
  cumulative: Float64Array;
  /** guide[j]: the first k whose running sum exceeds (j − 1)/G, G = guide.length (see firstAbove). */
  guide: Int32Array;
}

const supportCache = new WeakMap<RolloutTables, StartSupport>();

/** The states with positive start probability and their running sum (last entry exactly 1). */
export function startSupport(mdp: RolloutTables): StartSupport {
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
  // A bucket's lower bound is taken one bucket down, (j − 1)/G, so that a u whose product
  // u·G rounds up into bucket j still has every running sum below the guide at most u.
  const buckets = states.length;
  const guide = new Int32Array(buckets);
  for (let j = 0, k = 0; j < buckets; j++) {
    const below = (j - 1) / buckets;
    while (k < buckets - 1 && cumulative[k] <= below) k++;
    guide[j] = k;
  }
  const support = { states: Int32Array.from(states), cumulative, guide };
  supportCache.set(mdp, support);
  return support;
}
