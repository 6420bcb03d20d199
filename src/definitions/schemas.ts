/**
 * The one source of truth for definition formats: the command line validates files with
 * these schemas and the HTTP layer validates request bodies with the same ones.
 */
import { z } from 'zod';
import { gridworldSchema, type GridworldDefinition } from './gridworld-schema.js';
import { moduleEnvironmentSchema, type ModuleEnvironmentDefinition } from './module-schema.js';
import { processEnvironmentSchema, type ProcessEnvironmentDefinition } from './process-schema.js';
import { tabularSchema, type TabularDefinition } from './tabular-schema.js';

export { policySchema, policyReferenceSchema, actionChoiceSchema, distributionSchema } from './policy-schema.js';
export type {
  ActionChoice,
  ArrowsPolicyDefinition,
  EpsilonPolicyDefinition,
  ModulePolicyDefinition,
  ProcessPolicyDefinition,
  PolicyDefinition,
  PolicyReference,
  TablePolicyDefinition,
  UniformPolicyDefinition,
} from './policy-schema.js';
export { gridworldSchema, tabularSchema, moduleEnvironmentSchema, processEnvironmentSchema };
export type { GridworldDefinition, TabularDefinition, ModuleEnvironmentDefinition, ProcessEnvironmentDefinition };
export { groupSchema, groupMemberSchema, type GroupDefinition, type GroupMemberEntry } from './group-schema.js';

export type EnvironmentDefinition = GridworldDefinition | TabularDefinition | ModuleEnvironmentDefinition | ProcessEnvironmentDefinition;

export const environmentSchema: z.ZodType<EnvironmentDefinition> = z.discriminatedUnion('kind', [
  gridworldSchema,
  tabularSchema,
  moduleEnvironmentSchema,
  processEnvironmentSchema,
]);
