/**
 * A group file: the policies one training method produced with different seeds, so that a
 * training script can write one file and `compare --group NAME=FILE` read it. Each entry is
 * a policy file's path (relative to the group file), `{"path": FILE}`, or a policy inline.
 */
import { z } from 'zod';
import { policyReferenceSchema, policySchema, type PolicyDefinition, type PolicyReference } from './policy-schema.js';
import { describedFields, strictObject } from './schema-parts.js';

export type GroupMemberEntry = string | PolicyReference | PolicyDefinition;

export interface GroupDefinition {
  kind: 'group';
  name?: string;
  description?: string;
  policies: GroupMemberEntry[];
}

export const groupMemberSchema = z.union([z.string().min(1), policyReferenceSchema, z.lazy(() => policySchema)], {
  error: 'must be a policy file\'s path, {"path": FILE}, or a policy (an object with "kind")',
});

export const groupSchema: z.ZodType<GroupDefinition> = strictObject({
  kind: z.literal('group'),
  ...describedFields,
  policies: z.array(groupMemberSchema).min(2, { error: 'a group needs at least 2 policies (one a training seed)' }),
});
