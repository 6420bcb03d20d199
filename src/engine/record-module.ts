/**
 * Replays episodes of a code environment exactly as its rollout loop runs them (the same
 * streams and draws, so the same trajectories and returns: module-rollout.ts) and writes each
 * step as a line of the logged-episode format, with the behaviour policy's probabilities from
 * `probabilitiesAt`. States are written by the environment's `stateName` (else `String`), the
 * names a target policy is matched by. Runs on a worker thread, like every call into plug-in code.
 */
import { closeSync, openSync } from 'node:fs';
import type { CodePolicy, ModuleEnvironment } from '../definitions/built.js';
import { InputError, PluginError } from '../errors.js';
import type { StepResult } from '../plugin.js';
import { checkedAction } from './checked-action.js';
import { LogLines } from './log-lines.js';
import { pluginRngs } from './episode-rng.js';
import { pluginClock } from './plugin-clock.js';
import { STREAM, seedStream } from './streams.js';

export interface ModuleRecordRequest {
  readonly env: ModuleEnvironment;
  readonly policy: CodePolicy;
  readonly seed: number;
  readonly startName: string | null;
  readonly first: number;
  readonly count: number;
  readonly description: string;
}

/** Writes the log to `path`; returns each episode's return, as the run computed it. */
export function recordModuleEpisodes(path: string, request: ModuleRecordRequest): Float64Array {
  const { env: built, policy, seed, startName, first, count } = request;
  const probabilitiesAt = policy.probabilitiesAt;
  if (!probabilitiesAt) throw new InputError('--record', "needs the behaviour policy's probabilities: this code policy has no probabilities(state)");
  let fd: number;
  try {
    fd = openSync(path, 'w');
  } catch (e) {
    throw new InputError('--record', `cannot write ${path}: ${(e as Error).message}`);
  }
  const { env, discount, horizon, actionNames } = built;
  const actionCount = actionNames.length;
  const nameOf = (state: unknown) => (env.stateName ? env.stateName(state) : String(state));
  const { env: envRng, policy: policyRng } = pluginRngs();
  const clock = pluginClock();
  const out: StepResult = { state: undefined, reward: 0, done: false };
  const returns = new Float64Array(count);
  const actionText = actionNames.map((a) => JSON.stringify(a));
  const lines = new LogLines(fd, {
    discount,
    ...(built.rewardRange ? { reward_bounds: built.rewardRange } : {}),
    horizon,
    actions: actionNames,
    description: request.description,
  });
  try {
    for (let i = 0; i < count; i++) {
      const episode = first + i;
      seedStream(envRng, seed, STREAM.ENV, episode);
      seedStream(policyRng, seed, STREAM.POLICY, episode);
      clock[0] = episode;
      clock[1] = -1;
      let state: unknown;
      try {
        state = startName !== null ? env.stateFromName!(startName) : env.reset(envRng);
      } catch (e) {
        throw new PluginError('the environment (reset)', episode, 0, e);
      }
      let g = 0;
      let weight = 1;
      let t = 0;
      let name = JSON.stringify(nameOf(state));
      while (t < horizon) {
        clock[1] = 2 * t;
        const row = probabilitiesAt(state);
        const a = checkedAction(policy.acting, state, policyRng, actionCount, episode, t);
        const p = row[a];
        if (!(p > 0)) throw new InputError('--record', `the policy chose action ${actionText[a]} in state ${name} (episode ${episode}, step ${t}), to which its probabilities(state) give 0`);
        clock[1] = 2 * t + 1;
        let result: StepResult;
        try {
          result = env.step(state, a, envRng, out);
        } catch (e) {
          throw new PluginError('the environment (step)', episode, t, e);
        }
        const reward = result.reward;
        g += weight * reward;
        weight *= discount;
        state = result.state;
        t++;
        const next = JSON.stringify(nameOf(state));
        const end = result.done ? '"terminal"' : t >= horizon ? '"truncated"' : 'null';
        lines.add(`{"episode":${episode},"t":${t - 1},"state":${name},"action":${actionText[a]},"reward":${reward},"behaviour_prob":${p},"behaviour_probs":[${Array.from(row).join(',')}],"next_state":${next},"end":${end}}\n`);
        name = next;
        if (result.done) break;
      }
      returns[i] = g;
    }
    lines.flush();
  } finally {
    closeSync(fd);
  }
  return returns;
}
