/** JSON to typed definitions (no file access): used for files and for HTTP bodies. */
import type { DefinitionSource } from './built.js';
import { zodInputError } from './issues.js';
import { environmentSchema, policySchema, type EnvironmentDefinition, type PolicyDefinition } from './schemas.js';

/** Validates an environment definition; throws InputError `<label>: <path> <message>`. */
export function parseEnvironment(json: unknown, source: DefinitionSource): EnvironmentDefinition {
  const result = environmentSchema.safeParse(json);
  if (!result.success) throw zodInputError(result.error, json, source.label);
  return result.data;
}

/** Validates a policy definition; action and state names are checked later, against an environment. */
export function parsePolicy(json: unknown, source: DefinitionSource): PolicyDefinition {
  const result = policySchema.safeParse(json);
  if (!result.success) throw zodInputError(result.error, json, source.label);
  return result.data;
}
