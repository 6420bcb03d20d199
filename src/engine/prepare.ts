import { parseEnvironment, parsePolicy, buildEnvironment, buildPolicy } from '../definitions/index.js';
import type { BuiltEnvironment, BuiltPolicy } from '../definitions/built.js';
import { InputError } from '../errors.js';
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

/**
 * Visit-keyed noise addresses draws by state index, which only a finite environment has; a
 * module environment's states are its own values. Refused before its code is loaded.
 */
export function refuseVisitNoiseOnModule(spec: Pick<RolloutSpec, 'env' | 'noise'>): void {
  if (spec.noise === 'visit' && (spec.env.json as { kind?: unknown } | null)?.kind === 'module') {
    throw new InputError('--noise', `visit needs a finite environment (gridworld or tabular), and ${spec.env.source.label} is a module environment; use --noise step`);
  }
}
