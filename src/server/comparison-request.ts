import { z } from 'zod';
import { parseOption } from '../options/parse-option.js';
import { zodInputError } from '../definitions/index.js';
import type { CompareRequest } from '../evaluate/compare.js';
import { differenceMethod } from '../options/difference-method.js';
import { nameSchema, runOptionFields, serverRunSize, type ServerLimits } from './evaluation-request.js';
import { refuseCodeAndPaths } from './inline-definitions.js';
import { noiseMode } from '../options/noise-option.js';

/** `POST /api/comparisons`: one environment, two to eight policies inline, and the options of `reckon compare`. */
export const comparisonBodySchema = z
  .object({
    env: z.record(z.string(), z.unknown()),
    env_name: nameSchema.optional(),
    policies: z
      .array(z.object({ name: nameSchema.optional(), definition: z.record(z.string(), z.unknown()) }).strict())
      .min(2, { message: 'give at least two policies to compare' })
      .max(8, { message: 'compare at most eight policies at once' }),
    ...runOptionFields,
    iqm: z.boolean().optional(),
  })
  .strict();

export type ComparisonBody = z.infer<typeof comparisonBodySchema>;

export function parseComparisonBody(body: unknown): ComparisonBody {
  const result = comparisonBodySchema.safeParse(body ?? {});
  if (!result.success) throw zodInputError(result.error, body, 'request');
  return result.data;
}

/** The labels errors start with: the names given, or env and policy 1, policy 2, … */
export function comparisonLabels(body: ComparisonBody): { env: string; policies: string[] } {
  return { env: body.env_name ?? 'env', policies: body.policies.map((p, i) => p.name ?? `policy ${i + 1}`) };
}

/** A checked comparison body to the request `runStoredComparison` takes; throws InputError (400). */
export function planComparison(body: ComparisonBody, seed: number, limits: ServerLimits): CompareRequest {
  refuseCodeAndPaths(body.env, 'env');
  body.policies.forEach((p) => refuseCodeAndPaths(p.definition, 'policy'));
  const labels = comparisonLabels(body);
  const text = (v: number) => String(v);
  const { episodes, targetError } = serverRunSize(body, limits);
  const { method, sequence } = differenceMethod(body.ci, targetError);
  return {
    env: { json: body.env, source: { label: labels.env, baseDir: limits.baseDir } },
    policies: body.policies.map((p, i) => ({ json: p.definition, source: { label: labels.policies[i], baseDir: limits.baseDir } })),
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
