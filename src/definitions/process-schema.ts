/**
 * `"kind": "process"` definitions: an environment served by a program of its own (a Python
 * script ending with `serve(make_env)`, python/reckon_bridge.py), and a policy that lives in
 * that program. reckon speaks to the program over its stdin and stdout.
 */
import { z } from 'zod';
import { describedFields, optionsSchema, strictObject, toleranceSchema } from './schema-parts.js';

export const processEnvironmentSchema = strictObject({
  kind: z.literal('process'),
  ...describedFields,
  /** The program and its arguments; arguments starting with ./ or ../ are resolved against the file's folder. */
  command: z.array(z.string().min(1)).min(1, { error: 'must name the program to run, e.g. ["python3", "./env.py"]' }),
  options: optionsSchema,
  truncation_tolerance: toleranceSchema.optional(),
});
export type ProcessEnvironmentDefinition = z.output<typeof processEnvironmentSchema>;

/** A policy of the environment's own program: `name` is the key of `serve(..., policies={...})`. */
export const processPolicySchema = strictObject({
  kind: z.literal('process'),
  name: z.string().min(1),
  description: z.string().optional(),
  options: optionsSchema,
});
export type ProcessPolicyDefinition = z.output<typeof processPolicySchema>;

/** Definition kinds that run a user's code: refused over HTTP, run on worker threads only. */
const CODE_KINDS: ReadonlySet<unknown> = new Set(['module', 'process']);

/** Whether a definition's JSON (top level only) is of a kind that runs code. */
export function isCodeKind(json: unknown): boolean {
  return CODE_KINDS.has((json as { kind?: unknown } | null)?.kind);
}
