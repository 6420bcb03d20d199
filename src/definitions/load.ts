/** File to built object in one call, for the command line: read, parse, build. */
import type { BuiltEnvironment, BuiltPolicy, DefinitionSource } from './built.js';
import { buildEnvironment } from './build-environment.js';
import { buildPolicy } from './build-policy.js';
import { parseEnvironment, parsePolicy } from './parse.js';
import { readDefinitionFile } from './read-file.js';
import type { EnvironmentDefinition, PolicyDefinition } from './schemas.js';

export interface LoadedEnvironment {
  readonly definition: EnvironmentDefinition;
  readonly source: DefinitionSource;
  readonly built: BuiltEnvironment;
}

export interface LoadedPolicy {
  readonly definition: PolicyDefinition;
  readonly source: DefinitionSource;
  readonly built: BuiltPolicy;
}

export async function loadEnvironmentFile(path: string, label: string = path): Promise<LoadedEnvironment> {
  const { json, source } = readDefinitionFile(path, label);
  const definition = parseEnvironment(json, source);
  return { definition, source, built: await buildEnvironment(definition, source) };
}

export async function loadPolicyFile(path: string, env: BuiltEnvironment, label: string = path): Promise<LoadedPolicy> {
  const { json, source } = readDefinitionFile(path, label);
  const definition = parsePolicy(json, source);
  return { definition, source, built: await buildPolicy(definition, env, source) };
}
