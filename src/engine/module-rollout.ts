import type { ActingPolicy, ModuleEnvironment } from '../definitions/built.js';
import type { StepResult } from '../plugin.js';
import { PluginError } from '../errors.js';
import { checkedAction } from './checked-action.js';
import { Xoshiro128 } from './xoshiro128.js';
import { STREAM, seedStream } from './streams.js';
import type { EpisodeBlock } from './episode-block.js';
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
  const envRng = new Xoshiro128();
  const policyRng = new Xoshiro128();
  const { env, discount, horizon } = built;
  const actionCount = built.actionNames.length;
  const out: StepResult = { state: undefined, reward: 0, done: false };
  const { returns, lengths, first, count } = block;
  const clock = pluginClock();
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
      const a = checkedAction(acting, state, policyRng, actionCount, episode, t);
      clock[1] = 2 * t + 1;
      let result: StepResult;
      try {
        result = env.step(state, a, envRng, out);
      } catch (e) {
        throw new PluginError('the environment (step)', episode, t, e);
      }
      const reward = result.reward;
      if (typeof reward !== 'number' || !Number.isFinite(reward)) {
        throw new PluginError('the environment (step)', episode, t, new Error(`returned reward ${String(reward)}, not a finite number`));
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
