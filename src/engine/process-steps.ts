import type { ActingPolicy, ModuleEnvironment } from '../definitions/built.js';
import type { ProcessConnection } from '../definitions/process-connection.js';
import { PluginError } from '../errors.js';
import { checkedAction } from './checked-action.js';
import { NO_FINAL_STATE, type EpisodeBlock } from './episode-block.js';
import { EpisodeRng } from './episode-rng.js';
import { pluginClock } from './plugin-clock.js';
import { helperFailure, processFailure, type HelperError } from './process-failure.js';
import { episodeSeed } from './process-seeds.js';
import { STREAM, seedStream } from './streams.js';

/** Episodes a process environment runs side by side on the step path (one environment object each). */
const WIDTH = 64;

const policyRngs: EpisodeRng[] = [];

/**
 * The step path: reckon's policy acts on a process environment. Up to {@link WIDTH} episodes
 * of the block run side by side, each in its own environment object of the program, and one
 * message carries one step of every one of them, so a round trip is paid per step of the
 * batch, not per step of an episode. Each episode keeps its own streams (the program resets
 * it with the 64-bit seed from its ENV stream, the policy draws from its POLICY stream), so
 * episode i's return does not depend on which episodes shared its batch. reckon sums the
 * discounted return itself, in step order, as the module rollout does.
 */
export async function rolloutProcessSteps(
  built: ModuleEnvironment,
  connection: ProcessConnection,
  acting: ActingPolicy,
  seed: number,
  block: EpisodeBlock,
  stepTimeout: number,
): Promise<number> {
  const { discount, horizon } = built;
  const label = built.process!.label;
  const actionCount = built.actionNames.length;
  const lowReward = built.rewardRange ? built.rewardRange[0] : -Infinity;
  const highReward = built.rewardRange ? built.rewardRange[1] : Infinity;
  const { returns, lengths, finals, first, count } = block;
  finals.fill(NO_FINAL_STATE); // a program's states are its own values, never indices
  const width = Math.min(WIDTH, count);
  while (policyRngs.length < width) policyRngs.push(new EpisodeRng());
  const clock = pluginClock();

  // Per slot: the episode (index into the block, -1 when idle), its state name, return so far,
  // discount weight and step; `fresh` until the program has reset it.
  const slotEpisode = new Int32Array(width).fill(-1);
  const slotState: string[] = new Array(width).fill('');
  const slotReturn = new Float64Array(width);
  const slotWeight = new Float64Array(width);
  const slotStep = new Int32Array(width);
  const fresh = new Uint8Array(width);
  let nextEpisode = 0;
  const startNext = (s: number) => {
    if (nextEpisode >= count) {
      slotEpisode[s] = -1;
      return;
    }
    slotEpisode[s] = nextEpisode++;
    slotReturn[s] = 0;
    slotWeight[s] = 1;
    slotStep[s] = 0;
    fresh[s] = 1;
  };
  for (let s = 0; s < width; s++) startNext(s);

  const commandSlots = new Int32Array(width);
  const commands: string[] = [];
  let finished = 0;
  let steps = 0;
  while (finished < count) {
    commands.length = 0;
    let n = 0;
    for (let s = 0; s < width; s++) {
      const e = slotEpisode[s];
      if (e < 0) continue;
      const episode = first + e;
      if (fresh[s]) {
        seedStream(policyRngs[s], seed, STREAM.POLICY, episode);
        commands.push(`[${s},"r",${episodeSeed(seed, STREAM.ENV, episode)}]`);
      } else {
        clock[0] = episode;
        clock[1] = 2 * slotStep[s];
        const a = checkedAction(acting, slotState[s], policyRngs[s], actionCount, episode, slotStep[s]);
        commands.push(`[${s},${a}]`);
      }
      commandSlots[n++] = s;
    }
    const placeOf = (index: number) => {
      const s = commandSlots[Math.max(0, Math.min(n - 1, index))];
      return { episode: first + slotEpisode[s], step: fresh[s] ? 0 : slotStep[s] };
    };
    const s0 = commandSlots[0];
    clock[0] = first + slotEpisode[s0];
    clock[1] = fresh[s0] ? -1 : 2 * slotStep[s0] + 1;
    let reply: Record<string, unknown>;
    try {
      connection.send(`{"op":"step","cmds":[${commands.join(',')}]}`);
      reply = await connection.receive(stepTimeout);
    } catch (e) {
      throw processFailure(e, placeOf, placeOf(0), label, stepSpan(commandSlots, n, slotEpisode, first));
    }
    if (reply.error) throw helperFailure(reply.error as HelperError, placeOf, label);
    const results = reply.r as unknown[];
    if (!Array.isArray(results) || results.length !== n) {
      throw new PluginError(`the environment (${label})`, placeOf(0).episode, placeOf(0).step, new Error(`answered ${JSON.stringify(reply).slice(0, 80)} to a step of ${n} episodes`), 'broke the protocol');
    }
    for (let k = 0; k < n; k++) {
      const s = commandSlots[k];
      if (fresh[s]) {
        fresh[s] = 0;
        slotState[s] = results[k] as string;
        if (horizon <= 0) finish(s);
        continue;
      }
      const [reward, end, name] = results[k] as [number, number, string | null];
      const t = slotStep[s];
      if (typeof reward !== 'number' || !Number.isFinite(reward) || reward < lowReward || reward > highReward) {
        throw new PluginError(`the environment (step)`, first + slotEpisode[s], t, new Error(`${String(reward)} is not a finite number within the declared reward bounds`), 'returned a bad reward');
      }
      slotReturn[s] += slotWeight[s] * reward;
      slotWeight[s] *= discount;
      slotStep[s] = t + 1;
      steps++;
      if (end !== 0 || t + 1 >= horizon) finish(s);
      else slotState[s] = name as string;
    }
  }
  return steps;

  function finish(s: number): void {
    const e = slotEpisode[s];
    returns[e] = slotReturn[s];
    lengths[e] = slotStep[s];
    finished++;
    startNext(s);
  }
}

/** The episodes one step message carried, for a program that died on it: "episodes 3, 5 and 9 side by side". */
function stepSpan(commandSlots: Int32Array, n: number, slotEpisode: Int32Array, first: number): string {
  const episodes = Array.from(commandSlots.subarray(0, n), (s) => first + slotEpisode[s]).sort((a, b) => a - b);
  if (episodes.length === 1) return `episode ${episodes[0]}`;
  const shown = episodes.length > 6 ? `${episodes.slice(0, 5).join(', ')}, … ${episodes[episodes.length - 1]}` : episodes.join(', ');
  return `a step of episodes ${shown} (side by side)`;
}
