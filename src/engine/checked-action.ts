import type { ActingPolicy } from '../definitions/built.js';
import type { Rng } from '../plugin.js';
import { PluginError } from '../errors.js';

/**
 * A code policy's action, checked: an exception or an action outside 0..actionCount − 1 becomes
 * a PluginError naming the episode and step, so the same seed replays it.
 */
export function checkedAction(acting: ActingPolicy, state: unknown, rng: Rng, actionCount: number, episode: number, step: number): number {
  let a: number;
  try {
    a = acting.act(state, rng);
  } catch (e) {
    throw new PluginError('the policy', episode, step, e);
  }
  if (!(a >= 0 && a < actionCount && Number.isInteger(a))) {
    throw new PluginError('the policy', episode, step, new Error(`chose action ${String(a)}, not one of 0..${actionCount - 1}`));
  }
  return a;
}
