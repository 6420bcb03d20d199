import type { ModuleEnvironment } from '../definitions/built.js';
import type { ProcessConnection } from '../definitions/process-connection.js';
import { PluginError } from '../errors.js';
import { NO_FINAL_STATE, type EpisodeBlock } from './episode-block.js';
import { pluginClock } from './plugin-clock.js';
import { helperFailure, processFailure, type HelperError } from './process-failure.js';
import { episodeSeed } from './process-seeds.js';
import { STREAM } from './streams.js';

/**
 * The episode path: a policy of the environment's own program acts, so whole episodes run
 * inside the program. One message asks for the block's episodes with their two 64-bit seeds
 * each (ENV and POLICY streams of the episode); the program answers with returns and lengths,
 * in pieces at least every 50 ms while it works, so a silence longer than `--step-timeout`
 * means a call that does not return. The helper sums each return in step order
 * (g += w·r; w *= γ), as reckon's rollouts do. A block's request is sent when the block is
 * asked for, and its answers are read after those of the blocks asked for before it (the
 * program answers in order), so the program never idles between blocks.
 */
export function rolloutProcessEpisodes(
  built: ModuleEnvironment,
  connection: ProcessConnection,
  policyName: string,
  seed: number,
  block: EpisodeBlock,
  stepTimeout: number,
): Promise<number> {
  const { first, count } = block;
  const items = new Array<string>(count);
  for (let i = 0; i < count; i++) {
    items[i] = `[${episodeSeed(seed, STREAM.ENV, first + i)},${episodeSeed(seed, STREAM.POLICY, first + i)}]`;
  }
  // Sent now, even while an earlier block is still being answered: the program starts on it as
  // soon as it is done with that one, instead of waiting a round trip through this thread.
  // The horizon is reckon's (derived from reward_bounds when the script gives none).
  connection.send(`{"op":"episodes","policy":${JSON.stringify(policyName)},"horizon":${built.horizon},"items":[${items.join(',')}]}`);
  const earlier = reading.get(connection) ?? Promise.resolve(0);
  const mine = earlier.then(
    () => readEpisodes(built, connection, block, stepTimeout),
    () => readEpisodes(built, connection, block, stepTimeout),
  );
  reading.set(connection, mine);
  return mine;
}

/** Per program, the block whose answers are read last: a block sent after it reads after it. */
const reading = new WeakMap<ProcessConnection, Promise<number>>();

/** Reads one block's answers (in pieces) into the block; returns its steps. */
async function readEpisodes(built: ModuleEnvironment, connection: ProcessConnection, block: EpisodeBlock, stepTimeout: number): Promise<number> {
  const label = built.process!.label;
  const { returns, lengths, finals, first, count } = block;
  finals.fill(NO_FINAL_STATE); // a program's states are its own values, never indices
  const clock = pluginClock();
  let received = 0;
  const placeOf = (index: number, step: number) => ({ episode: first + index, step: Math.max(0, step) });
  clock[0] = first;
  clock[1] = -1;
  let steps = 0;
  for (;;) {
    let reply: Record<string, unknown>;
    try {
      reply = await connection.receive(stepTimeout);
    } catch (e) {
      const span = received + 1 === count ? `episode ${first + received}` : `episodes ${first + received} to ${first + count - 1}`;
      throw processFailure(e, placeOf, { episode: first + received, step: 0 }, label, span);
    }
    if (reply.error) throw helperFailure(reply.error as HelperError, (index, step) => placeOf(index, step), label);
    const partReturns = reply.returns as number[];
    const partLengths = reply.lengths as number[];
    if (!Array.isArray(partReturns) || !Array.isArray(partLengths) || partReturns.length !== partLengths.length || received + partReturns.length > count) {
      throw new PluginError(`the environment (${label})`, first + received, 0, new Error(`answered ${JSON.stringify(reply).slice(0, 80)} to a request for ${count} episodes`), 'broke the protocol');
    }
    for (let k = 0; k < partReturns.length; k++) {
      returns[received] = partReturns[k];
      lengths[received] = partLengths[k];
      steps += partLengths[k];
      received++;
    }
    clock[0] = first + received;
    if (reply.more !== true) break;
  }
  if (received !== count) {
    throw new PluginError(`the environment (${label})`, first + received, 0, new Error(`returned ${received} of ${count} episodes`), 'broke the protocol');
  }
  return steps;
}
