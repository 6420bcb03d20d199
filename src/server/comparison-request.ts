import { z } from 'zod';
import { parseOption } from '../options/parse-option.js';
import { groupSchema, zodInputError } from '../definitions/index.js';
import { InputError } from '../errors.js';
import type { PolicyGroup } from '../stats/groups/index.js';
import type { CompareRequest } from '../evaluate/compare.js';
import { differenceMethod } from '../options/difference-method.js';
import { nameSchema, runOptionFields, serverRunSize, type ServerLimits } from './evaluation-request.js';
import { refuseCodeAndPaths } from './inline-definitions.js';
import { noiseMode } from '../options/noise-option.js';

/** Most members of all groups of one comparison over HTTP. */
const MAX_GROUP_MEMBERS = 40;

/**
 * `POST /api/comparisons`: one environment, up to eight policies inline, groups of policies
 * (`{name, definition}`, the definition a group file's JSON with its policies inline: the
 * schema `compare --group` reads files with), and the options of `reckon compare`.
 */
export const comparisonBodySchema = z
  .object({
    env: z.record(z.string(), z.unknown()),
    env_name: nameSchema.optional(),
    policies: z
      .array(z.object({ name: nameSchema.optional(), definition: z.record(z.string(), z.unknown()) }).strict())
      .max(8, { message: 'compare at most eight policies at once' })
      .default([]),
    groups: z
      .array(z.object({ name: nameSchema, definition: groupSchema }).strict())
      .max(4, { message: 'compare at most four groups at once' })
      .optional(),
    ...runOptionFields,
    iqm: z.boolean().optional(),
  })
  .strict()
  .superRefine((body, ctx) => {
    const members = (body.groups ?? []).reduce((n, g) => n + g.definition.policies.length, 0);
    if (body.policies.length + members < 2) ctx.addIssue({ code: 'custom', path: ['policies'], message: 'give at least two policies to compare (or groups)' });
    if (members > MAX_GROUP_MEMBERS) ctx.addIssue({ code: 'custom', path: ['groups'], message: `at most ${MAX_GROUP_MEMBERS} group members in all (got ${members})` });
    const names = (body.groups ?? []).map((g) => g.name);
    names.forEach((name, i) => {
      if (names.indexOf(name) !== i) ctx.addIssue({ code: 'custom', path: ['groups', i, 'name'], message: `"${name}" is given twice; give each group its own name` });
    });
  });

export type ComparisonBody = z.infer<typeof comparisonBodySchema>;

export function parseComparisonBody(body: unknown): ComparisonBody {
  const result = comparisonBodySchema.safeParse(body ?? {});
  if (!result.success) throw zodInputError(result.error, body, 'request');
  return result.data;
}

/** The labels errors start with: the names given, or env and policy 1, policy 2, …; group members as `NAME member i`. */
export function comparisonLabels(body: ComparisonBody): { env: string; policies: string[]; fields: string[] } {
  const policies = body.policies.map((p, i) => p.name ?? `policy ${i + 1}`);
  const fields = body.policies.map((_, i) => `policies[${i}]`);
  (body.groups ?? []).forEach((g, gi) =>
    g.definition.policies.forEach((_, i) => {
      policies.push(`${g.name} member ${i + 1}`);
      fields.push(`groups[${gi}].definition.policies[${i}]`);
    }),
  );
  return { env: body.env_name ?? 'env', policies, fields };
}

/** The groups' members as inline policy definitions, after the plain policies; a file path is refused. */
function groupMembers(body: ComparisonBody): { definitions: Record<string, unknown>[]; groups: PolicyGroup[] } {
  const definitions: Record<string, unknown>[] = [];
  const groups: PolicyGroup[] = [];
  let next = body.policies.length;
  (body.groups ?? []).forEach((g, gi) => {
    const members: number[] = [];
    g.definition.policies.forEach((entry, i) => {
      if (typeof entry === 'string') {
        throw new InputError(`groups[${gi}].definition.policies[${i}]`, 'names a file, and the server accepts no file paths; give the policy inline instead');
      }
      definitions.push(entry as unknown as Record<string, unknown>);
      members.push(next++);
    });
    groups.push({ name: g.name, members });
  });
  return { definitions, groups };
}

/** A checked comparison body to the request `runStoredComparison` takes; throws InputError (400). */
export function planComparison(body: ComparisonBody, seed: number, limits: ServerLimits): CompareRequest {
  refuseCodeAndPaths(body.env, 'env');
  body.policies.forEach((p) => refuseCodeAndPaths(p.definition, 'policy'));
  const members = groupMembers(body);
  members.definitions.forEach((d) => refuseCodeAndPaths(d, 'policy'));
  const labels = comparisonLabels(body);
  const definitions = [...body.policies.map((p) => p.definition), ...members.definitions];
  const text = (v: number) => String(v);
  const { episodes, targetError } = serverRunSize(body, limits);
  const { method, sequence } = differenceMethod(body.ci, targetError);
  return {
    env: { json: body.env, source: { label: labels.env, baseDir: limits.baseDir } },
    policies: definitions.map((json, i) => ({ json, source: { label: labels.policies[i], baseDir: limits.baseDir } })),
    groups: members.groups.length > 0 ? members.groups : null,
    seed: body.seed === undefined ? seed : parseOption('seed', 'seed', text(body.seed)),
    start: body.start === undefined ? null : parseOption('start', 'start', body.start),
    noise: noiseMode(body.noise, 'compare', body.env),
    episodes,
    workers: limits.workers,
    method,
    sequence,
    level: body.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', text(body.confidence)),
    bounds: body.bounds === undefined ? null : parseOption('bounds', 'bounds', body.bounds.map(text).join(',')),
    sigma: body.sigma === undefined ? null : parseOption('sigma', 'sigma', text(body.sigma)),
    targetError,
    interquartileMean: body.iqm ?? false,
  };
}
