/**
 * A parsed policy definition to something that runs. On a finite environment the
 * built-in kinds compile to a PolicyMatrix; on a code environment every kind acts
 * through code. Epsilon policies may name their base by file; the chain of files is
 * tracked so a file that leads back to itself is an error, not a hang.
 */
import { existsSync } from 'node:fs';
import { isAbsolute, join, dirname, resolve } from 'node:path';
import { InputError } from '../errors.js';
import { buildArrowsPolicy } from './arrows-policy.js';
import type { ActingPolicy, BuiltEnvironment, BuiltPolicy, DefinitionSource } from './built.js';
import { buildModulePolicy, environmentActions } from './module-policy.js';
import { parsePolicy } from './parse.js';
import { buildProcessPolicy } from './process-policy.js';
import { epsilonMix, matrixFromRows, uniformRow } from './policy-matrix.js';
import { isPolicyReference, type EpsilonPolicyDefinition, type PolicyDefinition, type PolicyReference } from './policy-schema.js';
import { readDefinitionFile } from './read-file.js';
import { buildTablePolicyCode, buildTablePolicyFinite } from './table-policy.js';

export function buildPolicy(def: PolicyDefinition, env: BuiltEnvironment, source: DefinitionSource): Promise<BuiltPolicy> {
  return buildPolicyInChain(def, env, source, []);
}

/** `chain`: the policy files being loaded through `base.path`, outermost first. */
async function buildPolicyInChain(
  def: PolicyDefinition,
  env: BuiltEnvironment,
  source: DefinitionSource,
  chain: readonly ChainLink[],
): Promise<BuiltPolicy> {
  switch (def.kind) {
    case 'uniform':
      return uniformPolicy(env);
    case 'table':
      if (env.kind === 'finite') return buildTablePolicyFinite(def, env.mdp, source);
      return buildTablePolicyCode(def, env.env, env.actionNames, source);
    case 'arrows':
      if (env.kind !== 'finite') {
        throw new InputError(source.label, 'an "arrows" policy needs a gridworld environment (it is drawn over the layout)');
      }
      return buildArrowsPolicy(def, env.mdp, source);
    case 'module':
      return buildModulePolicy(def, env, source);
    case 'process':
      return buildProcessPolicy(def, env, source);
    case 'epsilon': {
      const base = await buildBase(def.base, env, source, chain);
      if (base.kind === 'code' && base.inProcess) {
        throw new InputError(source.label, 'base: a "process" policy runs whole episodes inside its program, so it cannot be the base of an epsilon policy; mix the noise into the Python policy instead');
      }
      return epsilonPolicy(def, env, base);
    }
  }
}

function uniformPolicy(env: BuiltEnvironment): BuiltPolicy {
  if (env.kind === 'finite') {
    const { stateCount, actionCount } = env.mdp;
    return { kind: 'matrix', matrix: matrixFromRows(stateCount, actionCount, () => uniformRow(actionCount)) };
  }
  const n = env.actionNames.length;
  const row = uniformRow(n);
  return { kind: 'code', matrix: null, acting: { act: (_state, rng) => rng.integer(n) }, probabilitiesAt: () => row };
}

/** With probability ε (one uniform draw u < ε) a uniform action, else the base policy's. */
function epsilonPolicy(def: EpsilonPolicyDefinition, env: BuiltEnvironment, base: BuiltPolicy): BuiltPolicy {
  const epsilon = def.epsilon;
  if (env.kind === 'finite' && base.kind === 'matrix') {
    return { kind: 'matrix', matrix: epsilonMix(base.matrix, env.mdp.stateCount, epsilon) };
  }
  if (base.kind !== 'code') throw new Error('a matrix policy on a code environment'); // unreachable by construction
  const n = environmentActions(env).length;
  const inner = base.acting;
  const acting: ActingPolicy = {
    act: (state, rng) => (rng.uniform() < epsilon ? rng.integer(n) : inner.act(state, rng)),
  };
  const matrix = env.kind === 'finite' && base.matrix ? epsilonMix(base.matrix, env.mdp.stateCount, epsilon) : null;
  const baseProbabilities = base.probabilitiesAt;
  const probabilitiesAt = baseProbabilities
    ? (state: unknown) => {
        const row = Float64Array.from(baseProbabilities(state), (p) => (1 - epsilon) * p + epsilon / n);
        return row;
      }
    : undefined;
  return { kind: 'code', acting, matrix, ...(probabilitiesAt ? { probabilitiesAt } : {}) };
}

interface ChainLink {
  readonly absolute: string;
  readonly label: string;
}

/** Builds an epsilon policy's base: inline, or from a file relative to this one's folder. */
async function buildBase(
  base: PolicyDefinition | PolicyReference,
  env: BuiltEnvironment,
  source: DefinitionSource,
  chain: readonly ChainLink[],
): Promise<BuiltPolicy> {
  if (!isPolicyReference(base)) return buildPolicyInChain(base, env, source, chain);
  const absolute = resolve(source.baseDir, base.path);
  const label = isAbsolute(base.path) ? base.path : join(dirname(source.label), base.path);
  const link = { absolute, label };
  if (chain.some((l) => l.absolute === absolute)) {
    const loop = [...chain, link].map((l) => l.label).join(' -> ');
    throw new InputError(source.label, `base.path "${base.path}" leads back to a policy file already being loaded (${loop})`);
  }
  if (!existsSync(absolute)) {
    throw new InputError(source.label, `base.path "${base.path}" names a file that does not exist (looked for ${absolute})`);
  }
  const file = readDefinitionFile(absolute, label);
  const def = parsePolicy(file.json, file.source);
  return buildPolicyInChain(def, env, file.source, [...chain, link]);
}
