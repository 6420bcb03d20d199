import type { ActingPolicy } from '../definitions/built.js';
import type { Policy, Rng } from '../plugin.js';
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

/**
 * The same check for a module policy called directly (ActingPolicy.direct): an index in range
 * is taken as it is, anything else goes through `index` (an action's name, or the error
 * `act` would throw), so actions and errors are those of {@link checkedAction}.
 */
export function checkedDirectAction(
  policy: Policy,
  index: (answer: unknown) => number,
  state: unknown,
  rng: Rng,
  actionCount: number,
  episode: number,
  step: number,
): number {
  let a: number;
  try {
    const answer = policy.act(state, rng);
    a = typeof answer === 'number' && answer >= 0 && answer < actionCount && Number.isInteger(answer) ? answer : index(answer);
  } catch (e) {
    throw new PluginError('the policy', episode, step, e);
  }
  if (!(a >= 0 && a < actionCount && Number.isInteger(a))) {
    throw new PluginError('the policy', episode, step, new Error(`chose action ${String(a)}, not one of 0..${actionCount - 1}`));
  }
  return a;
}
