/** A parsed environment definition to something that runs. */
import type { BuiltEnvironment, DefinitionSource } from './built.js';
import { compileGridworld } from './gridworld.js';
import { buildModuleEnvironment } from './module-environment.js';
import { buildProcessEnvironment } from './process-environment.js';
import type { EnvironmentDefinition } from './schemas.js';
import { compileTabular } from './tabular.js';

export async function buildEnvironment(def: EnvironmentDefinition, source: DefinitionSource): Promise<BuiltEnvironment> {
  switch (def.kind) {
    case 'gridworld':
      return { kind: 'finite', mdp: compileGridworld(def, source) };
    case 'tabular':
      return { kind: 'finite', mdp: compileTabular(def, source) };
    case 'module':
      return buildModuleEnvironment(def, source);
    case 'process':
      return buildProcessEnvironment(def, source);
  }
}
