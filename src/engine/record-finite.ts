/**
 * Replays episodes of a finite environment exactly as the rollout loops run them (the same
 * streams, the same draws, so the same trajectories and returns) and writes each step as a
 * line of the logged-episode format, with the behaviour policy's probabilities. Such a log
 * has a known truth: `reckon exact` gives any target policy's value on the environment.
 */
import { closeSync, openSync } from 'node:fs';
import type { BuiltPolicy } from '../definitions/built.js';
import type { FiniteMdp } from '../definitions/finite-mdp.js';
import { InputError } from '../errors.js';
import { checkedAction } from './checked-action.js';
import { LogLines } from './log-lines.js';
import { startSupport } from './finite-rollout.js';
import { STREAM, seedStream } from './streams.js';
import { Xoshiro128 } from './xoshiro128.js';
import { EpisodeRng } from './episode-rng.js';

export interface RecordRequest {
  readonly mdp: FiniteMdp;
  readonly policy: BuiltPolicy;
  readonly seed: number;
  /** A fixed start state index, or −1 for the start distribution. */
  readonly start: number;
  readonly first: number;
  readonly count: number;
  readonly description: string;
}

/** Writes the log to `path`; returns each episode's return, as the run computed it. */
export function recordFiniteEpisodes(path: string, request: RecordRequest): Float64Array {
  const { mdp, policy, seed, start, first, count } = request;
  const matrix = policy.matrix;
  if (!matrix) {
    throw new InputError('--record', 'needs the behaviour policy\'s probabilities: this code policy has no probabilities(state)');
  }
  let fd: number;
  try {
    fd = openSync(path, 'w');
  } catch (e) {
    throw new InputError('--record', `cannot write ${path}: ${(e as Error).message}`);
  }
  const { terminal, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, actionCount, discount, horizon, stateNames, actionNames } = mdp;
  const acting = policy.kind === 'code' ? policy.acting : null;
  const support = startSupport(mdp);
  const envRng = new Xoshiro128();
  const policyRng = new EpisodeRng(); // a code policy's draws, named distributions included
  const returns = new Float64Array(count);
  const names = stateNames.map((n) => JSON.stringify(n));
  const rows = Array.from({ length: mdp.stateCount }, (_, s) => `[${Array.from(matrix.probability.subarray(s * actionCount, (s + 1) * actionCount)).join(',')}]`);
  const lines = new LogLines(fd, {
    discount,
    reward_bounds: mdp.rewardRange,
    horizon,
    actions: actionNames,
    description: request.description,
  });
  try {
    for (let i = 0; i < count; i++) {
      const episode = first + i;
      seedStream(envRng, seed, STREAM.ENV, episode);
      seedStream(policyRng, seed, STREAM.POLICY, episode);
      let s = start;
      if (s < 0) {
        const u = envRng.uniform();
        let k = 0;
        while (k < support.states.length - 1 && u >= support.cumulative[k]) k++;
        s = support.states[k];
      }
      let g = 0;
      let weight = 1;
      let t = 0;
      if (terminal[s] !== 0) continue; // an episode that starts terminal has no step to log
      while (t < horizon) {
        const base = s * actionCount;
        let a: number;
        if (acting) a = checkedAction(acting, stateNames[s], policyRng, actionCount, episode, t);
        else if (matrix.deterministicAction[s] >= 0) a = matrix.deterministicAction[s];
        else {
          const u = policyRng.uniform();
          let j = base;
          while (j < base + actionCount - 1 && u >= matrix.cumulative[j]) j++;
          a = j - base;
        }
        const p = matrix.probability[base + a];
        if (!(p > 0)) throw new InputError('--record', `the policy chose action "${actionNames[a]}" in state "${stateNames[s]}" (episode ${episode}, step ${t}), to which its probabilities(state) give 0`);
        const sa = base + a;
        let k = outcomeStart[sa];
        const last = outcomeStart[sa + 1] - 1;
        const u = envRng.uniform();
        while (k < last && u >= outcomeCumulative[k]) k++;
        const reward = outcomeReward[k];
        g += weight * reward;
        weight *= discount;
        const next = outcomeNext[k];
        t++;
        const end = terminal[next] !== 0 ? '"terminal"' : t >= horizon ? '"truncated"' : 'null';
        lines.add(`{"episode":${episode},"t":${t - 1},"state":${names[s]},"action":${JSON.stringify(actionNames[a])},"reward":${reward},"behaviour_prob":${p},"behaviour_probs":${rows[s]},"next_state":${names[next]},"end":${end}}\n`);
        s = next;
        if (terminal[s] !== 0) break;
      }
      returns[i] = g;
    }
    lines.flush();
  } finally {
    closeSync(fd);
  }
  return returns;
}
