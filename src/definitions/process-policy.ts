/**
 * `"kind": "process"` policies: a policy served by a process environment's own program
 * (`serve(make_env, policies={"careful": make_careful})`). Whole episodes then run inside the
 * program (engine/process-episodes.ts); reckon hands it the seeds and receives the returns.
 */
import { InputError } from '../errors.js';
import type { BuiltEnvironment, BuiltPolicy, DefinitionSource } from './built.js';
import { listNames } from './describe-value.js';
import type { ProcessPolicyDefinition } from './process-schema.js';

export function buildProcessPolicy(def: ProcessPolicyDefinition, env: BuiltEnvironment, source: DefinitionSource): BuiltPolicy {
  if (env.kind !== 'module' || !env.process) {
    throw new InputError(
      source.label,
      `a "process" policy acts inside a process environment's program, and this environment is ${env.kind === 'finite' ? 'a gridworld or tabular one' : 'a module'}; use it with an environment of "kind": "process"`,
    );
  }
  const served = env.process.policies;
  if (!served.includes(def.name)) {
    const offer = served.length ? `it serves ${listNames([...served])}` : 'it serves none';
    throw new InputError(source.label, `name: ${env.process.label} serves no policy "${def.name}" (${offer}: pass them as serve(make_env, policies={...}))`);
  }
  return {
    kind: 'code',
    matrix: null,
    acting: {
      act() {
        throw new Error('a process policy acts inside its program (engine/process-episodes.ts)');
      },
    },
    inProcess: { name: def.name, options: def.options },
  };
}
