/**
 * The one source of truth for definition formats: the command line validates files with
 * these schemas and the HTTP layer validates request bodies with the same ones.
 */
import { z } from 'zod';
import { gridworldSchema, type GridworldDefinition } from './gridworld-schema.js';
import { moduleEnvironmentSchema, type ModuleEnvironmentDefinition } from './module-schema.js';
import { tabularSchema, type TabularDefinition } from './tabular-schema.js';

export { policySchema, policyReferenceSchema, actionChoiceSchema, distributionSchema } from './policy-schema.js';
export type {
  ActionChoice,
  ArrowsPolicyDefinition,
  EpsilonPolicyDefinition,
  ModulePolicyDefinition,
  PolicyDefinition,
  PolicyReference,
  TablePolicyDefinition,
  UniformPolicyDefinition,
} from './policy-schema.js';
export { gridworldSchema, tabularSchema, moduleEnvironmentSchema };
export type { GridworldDefinition, TabularDefinition, ModuleEnvironmentDefinition };

export type EnvironmentDefinition = GridworldDefinition | TabularDefinition | ModuleEnvironmentDefinition;

export const environmentSchema: z.ZodType<EnvironmentDefinition> = z.discriminatedUnion('kind', [
  gridworldSchema,
  tabularSchema,
  moduleEnvironmentSchema,
]);
