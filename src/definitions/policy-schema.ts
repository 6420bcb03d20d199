/**
 * Policy file formats, chosen by "kind". Action names are checked against an environment
 * only when the policy is built (see build-policy.ts): the schema knows no environment.
 */
import { z } from 'zod';
import { formatNumber } from './describe-value.js';
import { modulePolicySchema, type ModulePolicyDefinition } from './module-schema.js';
import { problem, reportProblems } from './problems.js';
import { processPolicySchema, type ProcessPolicyDefinition } from './process-schema.js';
import { describedFields, epsilonSchema, isSingleCharacter, strictObject, SUM_TOLERANCE, weightSchema } from './schema-parts.js';

/** `{action: probability}`: non-negative, summing to 1 within {@link SUM_TOLERANCE}. */
export const distributionSchema = z
  .record(z.string(), weightSchema)
  .refine((d) => Object.keys(d).length > 0, { error: 'must name at least one action' })
  .refine((d) => Math.abs(Object.values(d).reduce((a, b) => a + b, 0) - 1) <= SUM_TOLERANCE, {
    error: (issue) => {
      const sum = Object.values(issue.input as Record<string, number>).reduce((a, b) => a + b, 0);
      return `must sum to 1 (got ${formatNumber(sum)})`;
    },
  });

/** An action name, or a distribution over action names. */
export const actionChoiceSchema = z.union([z.string().min(1), distributionSchema], {
  error: 'must be an action name or an object {action: probability}',
});
export type ActionChoice = z.output<typeof actionChoiceSchema>;

/** The word that means "every action equally likely" where a policy allows it. */
export const UNIFORM = 'uniform';

export interface UniformPolicyDefinition {
  kind: 'uniform';
  name?: string;
  description?: string;
}
export interface TablePolicyDefinition {
  kind: 'table';
  name?: string;
  description?: string;
  /** For unlisted states: an action, a distribution, or "uniform". */
  default?: ActionChoice;
  states: Record<string, ActionChoice>;
}
export interface PolicyReference {
  path: string;
}
export interface EpsilonPolicyDefinition {
  kind: 'epsilon';
  name?: string;
  description?: string;
  epsilon: number;
  base: PolicyDefinition | PolicyReference;
}
export interface ArrowsPolicyDefinition {
  kind: 'arrows';
  name?: string;
  description?: string;
  rows: string[];
  /** Extra or overriding symbols: an action, a distribution, or "uniform". */
  key: Record<string, ActionChoice>;
}
export type { ModulePolicyDefinition, ProcessPolicyDefinition };
export type PolicyDefinition =
  | UniformPolicyDefinition
  | TablePolicyDefinition
  | EpsilonPolicyDefinition
  | ModulePolicyDefinition
  | ProcessPolicyDefinition
  | ArrowsPolicyDefinition;

const uniformPolicySchema = strictObject({ kind: z.literal('uniform'), ...describedFields });

const tablePolicySchema = strictObject({
  kind: z.literal('table'),
  ...describedFields,
  default: actionChoiceSchema.optional(),
  states: z.record(z.string(), actionChoiceSchema).default({}),
});

export const policyReferenceSchema = strictObject({ path: z.string().min(1) });

const epsilonPolicySchema = strictObject({
  kind: z.literal('epsilon'),
  ...describedFields,
  epsilon: epsilonSchema,
  base: z.union([z.lazy(() => policySchema), policyReferenceSchema], {
    error: 'must be a policy (an object with "kind") or {"path": FILE}',
  }),
});

const arrowsPolicySchema = strictObject({
  kind: z.literal('arrows'),
  ...describedFields,
  rows: z.array(z.string().min(1)).min(1),
  key: z.record(z.string(), actionChoiceSchema).default({}),
}).superRefine((def, ctx) =>
  reportProblems(
    Object.keys(def.key)
      .filter((symbol) => !isSingleCharacter(symbol))
      .map((symbol) => problem(['key'], `"${symbol}" must be a single character`)),
    ctx,
  ),
);

export const policySchema: z.ZodType<PolicyDefinition> = z.discriminatedUnion('kind', [
  uniformPolicySchema,
  tablePolicySchema,
  epsilonPolicySchema,
  modulePolicySchema,
  processPolicySchema,
  arrowsPolicySchema,
]);

export function isPolicyReference(base: PolicyDefinition | PolicyReference): base is PolicyReference {
  return !('kind' in base);
}
