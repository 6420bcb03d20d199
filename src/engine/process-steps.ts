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

/**
 * Most episodes a process environment runs side by side on the step path, one environment
 * object each. A block never has more (blocks are sized to take about 0.1 s), so only a fast
 * environment gets this many objects; with fewer, each message's fixed cost (a line each
 * way, a wake-up on each side) weighs more: on a trivial environment 128 side by side cost a
 * fifth more CPU per step than 512, and 2048 hardly less (scripts/bench-python.mjs).
 */
const WIDTH = 512;
/**
 * Messages in flight at once: the episodes side by side are split into this many lanes, and
 * while the program steps one lane, reckon reads the other's results and chooses its next
 * actions, so the two sides work at the same time instead of taking turns.
 */
const LANES = 2;
/** Below this many episodes a block runs in one lane (a round trip per step costs more than the overlap saves). */
const MIN_LANE_WIDTH = 8;

const policyRngs: EpisodeRng[] = [];

/** One lane's message in flight: the slots it commands, resets first. */
interface Lane {
  readonly from: number;
  readonly to: number;
  readonly slots: Int32Array;
  /** Commands of the message in flight, and how many of them (the first) are resets. */
  n: number;
  resets: number;
}

/**
 * The step path: reckon's policy acts on a process environment. Up to {@link WIDTH} episodes
 * of the block run side by side, each in its own environment object of the program, and one
 * message carries one step of each episode of a lane, so a round trip is paid per step of a
 * batch, not per step of an episode; {@link LANES} messages are in flight at once. Each
 * episode keeps its own streams (the program resets it with the 64-bit seed from its ENV
 * stream, the policy draws from its POLICY stream), so episode i's return does not depend on
 * which episodes shared its batch or lane. reckon sums the discounted return itself, in step
 * order, as the module rollout does.
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

  const laneCount = width >= LANES * MIN_LANE_WIDTH ? LANES : 1;
  const lanes: Lane[] = [];
  for (let l = 0; l < laneCount; l++) {
    const from = Math.floor((l * width) / laneCount);
    const to = Math.floor(((l + 1) * width) / laneCount);
    lanes.push({ from, to, slots: new Int32Array(to - from), n: 0, resets: 0 });
  }
  const resetParts: string[] = [];
  const actParts: string[] = [];

  /** The lane's next message (resets first, then steps), or null when its slots are all idle. */
  const compose = (lane: Lane): string | null => {
    resetParts.length = 0;
    actParts.length = 0;
    let n = 0;
    for (let s = lane.from; s < lane.to; s++) {
      const e = slotEpisode[s];
      if (e < 0 || !fresh[s]) continue;
      const episode = first + e;
      seedStream(policyRngs[s], seed, STREAM.POLICY, episode);
      resetParts.push(`${s},${episodeSeed(seed, STREAM.ENV, episode)}`);
      lane.slots[n++] = s;
    }
    lane.resets = n;
    for (let s = lane.from; s < lane.to; s++) {
      const e = slotEpisode[s];
      if (e < 0 || fresh[s]) continue;
      const episode = first + e;
      clock[0] = episode;
      clock[1] = 2 * slotStep[s];
      const a = checkedAction(acting, slotState[s], policyRngs[s], actionCount, episode, slotStep[s]);
      actParts.push(`${s},${a}`);
      lane.slots[n++] = s;
    }
    lane.n = n;
    if (n === 0) return null;
    return `{"op":"step","reset":[${resetParts.join(',')}],"act":[${actParts.join(',')}]}`;
  };

  /** Where command `index` of the lane's message ran: its episode and step. */
  const placeIn = (lane: Lane) => (index: number) => {
    const s = lane.slots[Math.max(0, Math.min(lane.n - 1, index))];
    return { episode: first + slotEpisode[s], step: fresh[s] ? 0 : slotStep[s] };
  };

  let finished = 0;
  let steps = 0;
  const finish = (s: number): void => {
    const e = slotEpisode[s];
    returns[e] = slotReturn[s];
    lengths[e] = slotStep[s];
    finished++;
    startNext(s);
  };

  /** Reads the answer to the lane's message into its slots. */
  const apply = (lane: Lane, reply: Record<string, unknown>): void => {
    const placeOf = placeIn(lane);
    const names = reply.n as unknown[];
    const rewards = reply.w as unknown[];
    const ends = reply.e as unknown[];
    const states = reply.s as unknown[];
    const stepped = lane.n - lane.resets;
    if (!Array.isArray(names) || !Array.isArray(rewards) || !Array.isArray(ends) || !Array.isArray(states) || names.length !== lane.resets || rewards.length !== stepped || ends.length !== stepped || states.length !== stepped) {
      throw new PluginError(`the environment (${label})`, placeOf(0).episode, placeOf(0).step, new Error(`answered ${JSON.stringify(reply).slice(0, 80)} to a step of ${lane.n} episodes`), 'broke the protocol');
    }
    for (let k = 0; k < lane.resets; k++) {
      const s = lane.slots[k];
      fresh[s] = 0;
      slotState[s] = names[k] as string;
      if (horizon <= 0) finish(s);
    }
    for (let j = 0; j < stepped; j++) {
      const s = lane.slots[lane.resets + j];
      const reward = rewards[j] as number;
      const t = slotStep[s];
      if (typeof reward !== 'number' || !Number.isFinite(reward) || reward < lowReward || reward > highReward) {
        throw new PluginError(`the environment (step)`, first + slotEpisode[s], t, new Error(`${String(reward)} is not a finite number within the declared reward bounds`), 'returned a bad reward');
      }
      slotReturn[s] += slotWeight[s] * reward;
      slotWeight[s] *= discount;
      slotStep[s] = t + 1;
      steps++;
      if (ends[j] !== 0 || t + 1 >= horizon) finish(s);
      else slotState[s] = states[j] as string;
    }
  };

  // Lanes in flight, oldest first: the program answers them in the order they were sent.
  const inFlight: Lane[] = [];
  const sendNext = (lane: Lane): void => {
    const message = compose(lane);
    if (message === null) return;
    connection.send(message);
    inFlight.push(lane);
  };
  for (const lane of lanes) sendNext(lane);
  while (inFlight.length > 0) {
    const lane = inFlight.shift()!;
    const placeOf = placeIn(lane);
    const s0 = lane.slots[0];
    clock[0] = first + slotEpisode[s0];
    clock[1] = fresh[s0] ? -1 : 2 * slotStep[s0] + 1;
    let reply: Record<string, unknown>;
    try {
      reply = await connection.receive(stepTimeout);
    } catch (e) {
      throw processFailure(e, placeOf, placeOf(0), label, stepSpan(lane.slots, lane.n, slotEpisode, first));
    }
    if (reply.error) throw helperFailure(reply.error as HelperError, placeOf, label);
    apply(lane, reply);
    sendNext(lane);
  }
  if (finished !== count) throw new Error(`the step path finished ${finished} of ${count} episodes`);
  return steps;
}

/** The episodes one step message carried, for a program that died on it: "episodes 3, 5 and 9 side by side". */
function stepSpan(commandSlots: Int32Array, n: number, slotEpisode: Int32Array, first: number): string {
  const episodes = Array.from(commandSlots.subarray(0, n), (s) => first + slotEpisode[s]).sort((a, b) => a - b);
  if (episodes.length === 1) return `episode ${episodes[0]}`;
  const shown = episodes.length > 6 ? `${episodes.slice(0, 5).join(', ')}, … ${episodes[episodes.length - 1]}` : episodes.join(', ');
  return `a step of episodes ${shown} (side by side)`;
}
