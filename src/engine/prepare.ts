import { parseEnvironment, parsePolicy, buildEnvironment, buildPolicy } from '../definitions/index.js';
import type { BuiltEnvironment, BuiltPolicy, CodePolicy, ModuleEnvironment } from '../definitions/built.js';
import type { ProcessConnection } from '../definitions/process-connection.js';
import { isCodeKind } from '../definitions/process-schema.js';
import { CLOCK_PID, pluginClock } from './plugin-clock.js';
import { rolloutProcessEpisodes } from './process-episodes.js';
import { rolloutProcessSteps } from './process-steps.js';
import { recordProcessPolicyEpisodes, recordReckonPolicyEpisodes } from './process-record.js';
import { InputError, StoppedEarly } from '../errors.js';
import { keepProcessConnections, startProgramEarly } from '../definitions/process-start.js';
import type { EpisodeBlock } from './episode-block.js';
import { rolloutFinite, rolloutFiniteActing } from './finite-rollout.js';
import { rolloutModule } from './module-rollout.js';
import { rolloutFiniteActingVisit, rolloutFiniteVisit } from './visit-rollout.js';
import type { RolloutSpec } from './spec.js';

/** A spec turned into something that runs blocks of episodes (in this thread). */
export interface PreparedRollout {
  readonly env: BuiltEnvironment;
  readonly policy: BuiltPolicy;
  /** The start state's index (finite envs) or -1 for the start distribution. */
  readonly startIndex: number;
  /** Runs the block's episodes, fills its arrays, returns the number of steps taken. */
  runBlock(block: EpisodeBlock): number;
  /**
   * For a process environment, in place of runBlock (which throws): the same, waiting on the
   * program; `stepTimeout` is how long it may stay silent. Only worker threads run it.
   */
  runBlockAsync?: (block: EpisodeBlock, stepTimeout: number) => Promise<number>;
  /** Whether runBlockAsync may start a block before the one before it has ended (it answers them in order). */
  readonly overlapBlocks?: boolean;
  /**
   * For a process environment on a worker thread: writes episodes first .. first + count − 1
   * as a logged-episode file (`estimate --record`), or, when the behaviour policy's
   * probabilities are unknown, `recordRefusal` says so.
   */
  readonly recordProcess?: (path: string, first: number, count: number, description: string, stepTimeout: number) => Promise<void>;
  readonly recordRefusal?: string;
  /** For a process environment: ends its program at once (a stopped run that cannot wait for a hung call). */
  readonly endProgram?: () => void;
}

/**
 * Prepares, on this thread, a spec that runsOnCallingThread: its program is started first and
 * kept running for the episodes (it ends when this process does). A stop while the program is
 * still starting (a make_env that never returns) kills it and throws StoppedEarly.
 */
export async function prepareOnCallingThread(spec: RolloutSpec, signal?: AbortSignal): Promise<PreparedRollout> {
  if (signal?.aborted) throw new StoppedEarly(0, 0, true);
  keepProcessConnections();
  const program = startProgramEarly(spec.env.json, spec.env.source); // the builder takes it over
  const onAbort = () => program?.kill();
  signal?.addEventListener('abort', onAbort, { once: true });
  try {
    return await prepareRollout(spec);
  } catch (e) {
    if (signal?.aborted) throw new StoppedEarly(0, 0, true);
    throw e;
  } finally {
    signal?.removeEventListener('abort', onAbort);
  }
}

export async function prepareRollout(spec: RolloutSpec): Promise<PreparedRollout> {
  refuseVisitNoiseOnModule(spec);
  const envDefinition = parseEnvironment(spec.env.json, spec.env.source);
  const env = await buildEnvironment(envDefinition, spec.env.source);
  const policyDefinition = parsePolicy(spec.policy.json, spec.policy.source);
  const policy = await buildPolicy(policyDefinition, env, spec.policy.source);
  const seed = spec.seed;

  if (env.kind === 'finite') {
    const mdp = env.mdp;
    let startIndex = -1;
    if (spec.start !== null) {
      const found = mdp.stateIndex.get(spec.start);
      if (found === undefined) {
        const examples = mdp.stateNames.slice(0, 4).map((n) => `"${n}"`).join(', ');
        throw new InputError('--start', `"${spec.start}" is not a state of ${spec.env.source.label} (states look like ${examples})`);
      }
      startIndex = found;
    }
    const visit = spec.noise === 'visit';
    if (policy.kind === 'matrix') {
      const matrix = policy.matrix;
      const rollout = visit ? rolloutFiniteVisit : rolloutFinite;
      return { env, policy, startIndex, runBlock: (block) => rollout(mdp, matrix, seed, startIndex, block) };
    }
    const acting = policy.acting;
    const rollout = visit ? rolloutFiniteActingVisit : rolloutFiniteActing;
    return { env, policy, startIndex, runBlock: (block) => rollout(mdp, acting, seed, startIndex, block) };
  }

  if (policy.kind !== 'code') throw new Error('a policy on a code environment must act through code');
  if (env.process) return prepareProcessRollout(spec, env, policy);
  const startName = spec.start;
  if (startName !== null) {
    if (typeof env.env.stateFromName !== 'function') {
      throw new InputError('--start', `${spec.env.source.label} does not define stateFromName(name), so it cannot start in "${startName}"`);
    }
    try {
      env.env.stateFromName(startName); // fail early on a name the environment rejects
    } catch (e) {
      throw new InputError('--start', `${spec.env.source.label} does not accept the state "${startName}": ${e instanceof Error ? e.message : String(e)}`);
    }
  }
  const acting = policy.acting;
  return { env, policy, startIndex: -1, runBlock: (block) => rolloutModule(env, acting, seed, startName, block) };
}

/** A process environment: reckon's policy acting step by step, or a policy of its program running whole episodes. */
async function prepareProcessRollout(spec: RolloutSpec, env: ModuleEnvironment, policy: CodePolicy): Promise<PreparedRollout> {
  if (spec.start !== null) {
    throw new InputError('--start', `${spec.env.source.label} is a process environment, whose episodes start where its reset(seed) puts them; leave out --start (a start of your own goes in the definition's "options", for make_env to read)`);
  }
  const seed = spec.seed;
  const noProgram = (): never => {
    throw new Error('a process environment runs its blocks through runBlockAsync (engine/pool.ts)');
  };
  const connection = env.process!.connection;
  const base = { env, policy, startIndex: -1, runBlock: noProgram, ...(connection ? { endProgram: () => connection.kill() } : {}) };
  if (connection === null) return base;
  pluginClock()[CLOCK_PID] = connection.pid;
  const inProcess = policy.inProcess;
  const request = (first: number, count: number, description: string, stepTimeout: number) => ({ env, connection, seed, first, count, description, stepTimeout });
  if (!inProcess) {
    const { acting, probabilitiesAt } = policy;
    const recording = probabilitiesAt
      ? { recordProcess: (path: string, first: number, count: number, description: string, stepTimeout: number) => recordReckonPolicyEpisodes(path, request(first, count, description, stepTimeout), acting, probabilitiesAt) }
      : { recordRefusal: `${spec.policy.source.label} is a code policy without probabilities(state)` };
    return { ...base, ...recording, runBlockAsync: (block, stepTimeout) => rolloutProcessSteps(env, connection, acting, seed, block, stepTimeout) };
  }
  const hasProbabilities = await openProcessPolicy(connection, inProcess, spec.policy.source.label, env.process!.label);
  const recording = hasProbabilities
    ? { recordProcess: (path: string, first: number, count: number, description: string, stepTimeout: number) => recordProcessPolicyEpisodes(path, request(first, count, description, stepTimeout), inProcess.name) }
    : { recordRefusal: `policy "${inProcess.name}" of ${env.process!.label} has no probabilities(observation) method; give it one (a probability per action) to record its episodes` };
  return { ...base, ...recording, overlapBlocks: true, runBlockAsync: (block, stepTimeout) => rolloutProcessEpisodes(env, connection, inProcess.name, seed, block, stepTimeout) };
}

/**
 * Asks the program to create the policy (its make_policy): a failure there is the policy
 * file's error. Returns whether the policy has probabilities(observation).
 */
async function openProcessPolicy(connection: ProcessConnection, policy: { name: string; options: Record<string, unknown> }, where: string, label: string): Promise<boolean> {
  connection.send(JSON.stringify({ op: 'policy', name: policy.name, options: policy.options }));
  let answer: Record<string, unknown>;
  try {
    answer = await connection.receive(60);
  } catch (e) {
    throw new InputError(where, `policy "${policy.name}" of ${label}: ${(e as Error).message}`);
  }
  const error = answer.error as { message?: string; traceback?: string[]; what?: string } | undefined;
  if (error) {
    const trace = error.traceback?.length ? `\n  ${error.traceback.join('\n  ')}` : '';
    const how = error.what === 'threw' ? 'threw while being created' : 'was refused';
    throw new InputError(where, `policy "${policy.name}" of ${label} ${how}: ${error.message}${trace}`);
  }
  return answer.probabilities === true;
}

/**
 * Visit-keyed noise addresses draws by state index, which only a finite environment has; a
 * module environment's states are its own values. Refused before its code is loaded.
 */
export function refuseVisitNoiseOnModule(spec: Pick<RolloutSpec, 'env' | 'noise'>): void {
  if (spec.noise === 'visit' && isCodeKind(spec.env.json)) {
    const kind = (spec.env.json as { kind: string }).kind;
    throw new InputError('--noise', `visit needs a finite environment (gridworld or tabular), and ${spec.env.source.label} is a ${kind} environment; use --noise step`);
  }
}
