/**
 * `estimate --record` for a process environment: the run's episodes replayed exactly as the
 * run drew them and written as the logged-episode format, with the behaviour policy's
 * probabilities beside each step. A policy of the program records inside it (the helper's
 * `record` message: the episode path's loop, with its `probabilities(observation)` asked at
 * each step); reckon's own policy records step by step, one episode at a time, with the same
 * seeds and draws as the step path. States are the program's state names, the names a target
 * policy is matched by. Runs on the recorder's worker thread (record-worker.ts).
 */
import { closeSync, openSync } from 'node:fs';
import type { ActingPolicy, ModuleEnvironment } from '../definitions/built.js';
import type { ProcessConnection } from '../definitions/process-connection.js';
import { InputError, PluginError } from '../errors.js';
import { checkedAction } from './checked-action.js';
import { EpisodeRng } from './episode-rng.js';
import { LogLines } from './log-lines.js';
import { pluginClock } from './plugin-clock.js';
import { helperFailure, processFailure, type HelperError } from './process-failure.js';
import { episodeSeed } from './process-seeds.js';
import { STREAM, seedStream } from './streams.js';

/** Episodes asked for in one `record` message (answered in pieces, at least every 50 ms). */
const RECORD_BATCH = 256;

export interface ProcessRecordRequest {
  readonly env: ModuleEnvironment;
  readonly connection: ProcessConnection;
  readonly seed: number;
  readonly first: number;
  readonly count: number;
  readonly description: string;
  readonly stepTimeout: number;
}

function openLog(path: string): number {
  try {
    return openSync(path, 'w');
  } catch (e) {
    throw new InputError('--record', `cannot write ${path}: ${(e as Error).message}`);
  }
}

function logLines(fd: number, env: ModuleEnvironment, description: string): LogLines {
  return new LogLines(fd, {
    discount: env.discount,
    ...(env.rewardRange ? { reward_bounds: env.rewardRange } : {}),
    horizon: env.horizon,
    actions: env.actionNames,
    description,
  });
}

type RecordedStep = [string, number, number, number[], string, 'terminal' | 'truncated' | null];

/** A policy of the program acting: its episodes recorded inside the program. */
export async function recordProcessPolicyEpisodes(path: string, request: ProcessRecordRequest, policyName: string): Promise<void> {
  const { env, connection, seed, first, count, stepTimeout } = request;
  const label = env.process!.label;
  const actionText = env.actionNames.map((a) => JSON.stringify(a));
  const fd = openLog(path);
  const lines = logLines(fd, env, request.description);
  const clock = pluginClock();
  try {
    for (let from = first; from < first + count; from += RECORD_BATCH) {
      const size = Math.min(RECORD_BATCH, first + count - from);
      const items: string[] = [];
      for (let e = from; e < from + size; e++) items.push(`[${episodeSeed(seed, STREAM.ENV, e)},${episodeSeed(seed, STREAM.POLICY, e)}]`);
      connection.send(`{"op":"record","policy":${JSON.stringify(policyName)},"horizon":${env.horizon},"items":[${items.join(',')}]}`);
      let received = 0;
      const placeOf = (index: number, step: number) => ({ episode: from + received + index, step: Math.max(0, step) });
      for (;;) {
        clock[0] = from + received;
        clock[1] = -1;
        let reply: Record<string, unknown>;
        try {
          reply = await connection.receive(stepTimeout);
        } catch (e) {
          throw processFailure(e, placeOf, { episode: from + received, step: 0 }, label, `episodes ${from + received} to ${from + size - 1}`);
        }
        if (reply.error) {
          const error = reply.error as HelperError;
          if (error.what === 'refused' && error.call === 'make_policy') throw new InputError('--record', `needs the behaviour policy's probabilities: ${error.message}`);
          throw helperFailure(error, placeOf, label);
        }
        const episodes = reply.episodes as RecordedStep[][];
        if (!Array.isArray(episodes) || received + episodes.length > size) {
          throw new PluginError(`the environment (${label})`, from + received, 0, new Error(`answered ${JSON.stringify(reply).slice(0, 80)} to a request to record ${size} episodes`), 'broke the protocol');
        }
        for (const steps of episodes) {
          const episode = from + received;
          steps.forEach(([state, action, reward, row, next, end], t) => {
            lines.add(
              `{"episode":${episode},"t":${t},"state":${JSON.stringify(state)},"action":${actionText[action]},"reward":${reward},"behaviour_prob":${row[action]},"behaviour_probs":[${row.join(',')}],"next_state":${JSON.stringify(next)},"end":${end === null ? 'null' : JSON.stringify(end)}}\n`,
            );
          });
          received++;
        }
        if (reply.more !== true) break;
      }
      if (received !== size) throw new PluginError(`the environment (${label})`, from + received, 0, new Error(`recorded ${received} of ${size} episodes`), 'broke the protocol');
    }
    lines.flush();
  } finally {
    closeSync(fd);
  }
}

/**
 * reckon's policy acting (it has probabilitiesAt): each episode reset and stepped in slot 0
 * of the program, one step a message, with the step path's seeds and draws.
 */
export async function recordReckonPolicyEpisodes(path: string, request: ProcessRecordRequest, acting: ActingPolicy, probabilitiesAt: (state: unknown) => Float64Array): Promise<void> {
  const { env, connection, seed, first, count, stepTimeout } = request;
  const label = env.process!.label;
  const actionCount = env.actionNames.length;
  const actionText = env.actionNames.map((a) => JSON.stringify(a));
  const rng = new EpisodeRng();
  const clock = pluginClock();
  const fd = openLog(path);
  const lines = logLines(fd, env, request.description);
  const ask = async (message: string, episode: number, step: number): Promise<Record<string, unknown>> => {
    const placeOf = () => ({ episode, step });
    connection.send(message);
    let reply: Record<string, unknown>;
    try {
      reply = await connection.receive(stepTimeout);
    } catch (e) {
      throw processFailure(e, placeOf, placeOf(), label, `episode ${episode}`);
    }
    if (reply.error) throw helperFailure(reply.error as HelperError, placeOf, label);
    return reply;
  };
  try {
    for (let episode = first; episode < first + count; episode++) {
      seedStream(rng, seed, STREAM.POLICY, episode);
      clock[0] = episode;
      clock[1] = -1;
      const reset = await ask(`{"op":"step","reset":[0,${episodeSeed(seed, STREAM.ENV, episode)}],"act":[]}`, episode, 0);
      let name = String((reset.n as unknown[])[0]);
      for (let t = 0; t < env.horizon; t++) {
        clock[1] = 2 * t;
        const row = probabilitiesAt(name);
        const a = checkedAction(acting, name, rng, actionCount, episode, t);
        const p = row[a];
        if (!(p > 0)) throw new InputError('--record', `the policy chose action ${actionText[a]} in state ${JSON.stringify(name)} (episode ${episode}, step ${t}), to which its probabilities give 0`);
        clock[1] = 2 * t + 1;
        const reply = await ask(`{"op":"step","reset":[],"act":[0,${a}]}`, episode, t);
        const reward = (reply.w as number[])[0];
        const ended = (reply.e as number[])[0];
        const next = String((reply.s as unknown[])[0]);
        const end = ended === 1 ? '"terminal"' : ended === 2 || t + 1 >= env.horizon ? '"truncated"' : 'null';
        lines.add(
          `{"episode":${episode},"t":${t},"state":${JSON.stringify(name)},"action":${actionText[a]},"reward":${reward},"behaviour_prob":${p},"behaviour_probs":[${Array.from(row).join(',')}],"next_state":${JSON.stringify(next)},"end":${end}}\n`,
        );
        name = next;
        if (ended !== 0) break;
      }
    }
    lines.flush();
  } finally {
    closeSync(fd);
  }
}
