/**
 * `"kind": "module"` definitions (environment or policy written as code), and the shape
 * of what a module's factory must return. The returned objects are only validated, never
 * replaced by zod's copy, so their methods keep their `this`.
 */
import { z } from 'zod';
import { describeValue } from './describe-value.js';
import {
  describedFields,
  discountSchema,
  horizonSchema,
  optionsSchema,
  strictObject,
  toleranceSchema,
} from './schema-parts.js';

export const moduleEnvironmentSchema = strictObject({
  kind: z.literal('module'),
  ...describedFields,
  path: z.string().min(1),
  options: optionsSchema,
  truncation_tolerance: toleranceSchema.optional(),
});
export type ModuleEnvironmentDefinition = z.output<typeof moduleEnvironmentSchema>;

export const modulePolicySchema = strictObject({
  kind: z.literal('module'),
  ...describedFields,
  path: z.string().min(1),
  options: optionsSchema,
});
export type ModulePolicyDefinition = z.output<typeof modulePolicySchema>;

const functionSchema = z.custom<(...args: never[]) => unknown>((v) => typeof v === 'function', {
  error: (issue) => (issue.input === undefined ? 'is missing' : `must be a function (got ${describeValue(issue.input)})`),
});

const actionListSchema = z
  .array(z.string().min(1))
  .min(1)
  .refine((names) => new Set(names).size === names.length, { error: 'must not repeat a name' });

const rewardBoundsSchema = z
  .tuple([z.number(), z.number()])
  .refine(([lo, hi]) => lo <= hi, { error: 'must be [smallest, largest] with smallest <= largest' });

/** What an EnvironmentFactory must return (src/plugin.ts `Environment`). */
export const pluginEnvironmentSchema = z.object({
  actions: actionListSchema,
  discount: discountSchema,
  horizon: horizonSchema.optional(),
  rewardBounds: rewardBoundsSchema.optional(),
  /** Deprecated name of `rewardBounds`, still accepted (with a warning). */
  rewardRange: rewardBoundsSchema.optional(),
  reset: functionSchema,
  step: functionSchema,
  stateName: functionSchema.optional(),
  stateFromName: functionSchema.optional(),
});

/** What a PolicyFactory must return (src/plugin.ts `Policy`). */
export const pluginPolicySchema = z.object({
  act: functionSchema,
  probabilities: functionSchema.optional(),
});
