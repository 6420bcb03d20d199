import type { ActingPolicy, ModuleEnvironment } from '../definitions/built.js';
import type { StepResult } from '../plugin.js';
import { PluginError } from '../errors.js';
import { checkedAction, checkedDirectAction } from './checked-action.js';
import { pluginRngs } from './episode-rng.js';
import { STREAM, seedStream } from './streams.js';
import { NO_FINAL_STATE, type EpisodeBlock } from './episode-block.js';
import { pluginClock } from './plugin-clock.js';

/**
 * The rollout loop for a code environment. One reusable `out` object is handed to every
 * `step` call so that a plug-in that fills it allocates nothing per step. Exceptions from
 * plug-in code are wrapped with the episode and step, so `--seed` replays them.
 */
export function rolloutModule(
  built: ModuleEnvironment,
  acting: ActingPolicy,
  seed: number,
  startName: string | null,
  block: EpisodeBlock,
): number {
  const { env: envRng, policy: policyRng } = pluginRngs();
  const { env, discount, horizon } = built;
  const actionCount = built.actionNames.length;
  const direct = acting.direct;
  const out: StepResult = { state: undefined, reward: 0, done: false };
  const { returns, lengths, finals, first, count } = block;
  finals.fill(NO_FINAL_STATE);
  const clock = pluginClock();
  const lowReward = built.rewardRange ? built.rewardRange[0] : -Infinity;
  const highReward = built.rewardRange ? built.rewardRange[1] : Infinity;
  let steps = 0;
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
    while (t < horizon) {
      clock[1] = 2 * t;
      const a = direct
        ? checkedDirectAction(direct.policy, direct.index, state, policyRng, actionCount, episode, t)
        : checkedAction(acting, state, policyRng, actionCount, episode, t);
      clock[1] = 2 * t + 1;
      let result: StepResult;
      try {
        result = env.step(state, a, envRng, out);
      } catch (e) {
        throw new PluginError('the environment (step)', episode, t, e);
      }
      const reward = result.reward;
      if (typeof reward !== 'number' || !Number.isFinite(reward)) {
        throw new PluginError('the environment (step)', episode, t, new Error(`${describeValue(reward)} is not a finite number`), 'returned a bad reward');
      }
      // The declared bounds feed the horizon, Hoeffding and Bernstein: a reward outside them
      // would make those figures wrong without a word, so it stops the run.
      if (reward < lowReward || reward > highReward) {
        throw new PluginError(
          'the environment (step)',
          episode,
          t,
          new Error(`${reward} is outside the rewardBounds [${lowReward}, ${highReward}] it declares; fix the reward or the bounds`),
          'returned a bad reward',
        );
      }
      g += weight * reward;
      weight *= discount;
      state = result.state;
      t++;
      if (result.done) break;
    }
    returns[i] = g;
    lengths[i] = t;
    steps += t;
  }
  return steps;
}

/** A returned value as the user would recognise it, with its type when it is not a number. */
function describeValue(value: unknown): string {
  if (typeof value === 'string') return `${JSON.stringify(value)} (a string)`;
  if (typeof value === 'number') return String(value);
  if (value === null) return 'null';
  if (value === undefined) return 'undefined (no reward set)';
  if (Array.isArray(value)) return 'an array';
  return `a value of type ${typeof value}`;
}
