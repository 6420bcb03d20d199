import { z } from 'zod';
import { zodInputError } from '../definitions/index.js';
import { InputError } from '../errors.js';
import { DEFAULT_RESAMPLES } from '../stats/bootstrap-resample.js';
import { ESTIMATORS, type EstimatorName } from '../offpolicy/evaluate-log.js';
import { parseOffPolicyOption } from '../options/offpolicy-options.js';
import { parseOption } from '../options/parse-option.js';
import { nameSchema } from './evaluation-request.js';
import { refuseCodeAndPaths } from './inline-definitions.js';
import { annotationBodyFields, annotationsFromBody, type Annotations } from '../options/annotation-options.js';

/** Largest body of `POST /api/offpolicy`: a log is sent whole, so it may be far larger than other bodies. */
export const OFFPOLICY_BODY_LIMIT = 16 * 1024 * 1024;

/**
 * `POST /api/offpolicy`: the log as its JSON Lines text, the target (and optionally the
 * environment and the behaviour) inline, and the options of `reckon offpolicy` under their
 * JSON names, each checked by the schema that checks the command-line option.
 */
export const offPolicyBodySchema = z
  .object({
    log: z.string().min(1, { message: 'must be the log\'s JSON Lines text' }),
    policy: z.record(z.string(), z.unknown()),
    env: z.record(z.string(), z.unknown()).optional(),
    behaviour: z.record(z.string(), z.unknown()).optional(),
    log_name: nameSchema.optional(),
    policy_name: nameSchema.optional(),
    env_name: nameSchema.optional(),
    behaviour_name: nameSchema.optional(),
    estimators: z.string().optional(),
    confidence: z.number().optional(),
    resamples: z.number().optional(),
    folds: z.number().optional(),
    seed: z.number().optional(),
    ...annotationBodyFields,
  })
  .strict();

export type OffPolicyBody = z.infer<typeof offPolicyBodySchema>;

/** What the off-policy thread needs: the request's parts as data, its options checked. */
export interface OffPolicyTask {
  readonly log: string;
  readonly policy: unknown;
  readonly env: unknown | null;
  readonly behaviour: unknown | null;
  readonly labels: { readonly log: string; readonly policy: string; readonly env: string; readonly behaviour: string };
  readonly estimators: readonly EstimatorName[];
  readonly level: number;
  readonly seed: number;
  readonly resamples: number;
  readonly folds: number;
  readonly annotations: Annotations;
}

/** A checked body to the task the thread runs; throws InputError (HTTP 400) naming the field. */
export function planOffPolicy(body: unknown): OffPolicyTask {
  const parsed = offPolicyBodySchema.safeParse(body ?? {});
  if (!parsed.success) throw zodInputError(parsed.error, body, 'request');
  const b = parsed.data;
  refuseCodeAndPaths(b.policy, 'policy');
  if (b.env) refuseCodeAndPaths(b.env, 'env');
  if (b.behaviour) refuseCodeAndPaths(b.behaviour, 'behaviour');
  if (b.behaviour && !b.env) throw new InputError('behaviour', 'needs "env" with a gridworld or tabular environment, on which both policies are known everywhere');
  const text = (v: number) => String(v);
  return {
    log: b.log,
    policy: b.policy,
    env: b.env ?? null,
    behaviour: b.behaviour ?? null,
    labels: { log: b.log_name ?? 'log', policy: b.policy_name ?? 'policy', env: b.env_name ?? 'env', behaviour: b.behaviour_name ?? 'behaviour' },
    estimators: b.estimators === undefined ? [...ESTIMATORS] : parseOffPolicyOption('estimator', b.estimators),
    level: b.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', text(b.confidence)),
    seed: b.seed === undefined ? 1 : parseOption('seed', 'seed', text(b.seed)),
    resamples: b.resamples === undefined ? DEFAULT_RESAMPLES : parseOffPolicyOption('resamples', text(b.resamples)),
    folds: b.folds === undefined ? 5 : parseOffPolicyOption('folds', text(b.folds)),
    annotations: annotationsFromBody(b),
  };
}

/** The field of the request an InputError from this task belongs to. */
export function offPolicyFieldOf(error: InputError, labels: OffPolicyTask['labels']): string | null {
  const where = error.where;
  if (where === labels.log || where.startsWith(`${labels.log}: `)) return 'log';
  for (const field of ['policy', 'env', 'behaviour'] as const) if (where === labels[field] || where.startsWith(`${labels[field]}: `)) return field;
  if (where === '--estimator') return 'estimators';
  if (where.startsWith('--')) return where.slice(2);
  return null;
}
