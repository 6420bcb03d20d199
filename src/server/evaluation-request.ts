import { z } from 'zod';
import { parseOption } from '../options/parse-option.js';
import { runSize } from '../options/run-size.js';
import { zodInputError } from '../definitions/index.js';
import type { RolloutSpec } from '../engine/spec.js';
import { InputError } from '../errors.js';
import type { StoredOptions } from '../evaluate/stored-estimate.js';
import { refuseCodeAndPaths } from './inline-definitions.js';
import { noiseMode } from '../options/noise-option.js';
import { annotationBodyFields, annotationsFromBody, type Annotations } from '../options/annotation-options.js';

/** A definition's display name: what `runs list` shows and what error messages start with. */
export const nameSchema = z
  .string()
  .regex(/^[\w. ()+-]{1,80}$/, { message: 'must be 1 to 80 letters, digits, spaces or . _ - + ( )' });

/** The run options both request bodies share, under the JSON names of the command-line options. */
export const runOptionFields = {
  episodes: z.number().optional(),
  target_error: z.number().optional(),
  seed: z.number().optional(),
  start: z.string().optional(),
  confidence: z.number().optional(),
  ci: z.string().optional(),
  bounds: z.tuple([z.number(), z.number()]).optional(),
  sigma: z.number().optional(),
  noise: z.string().optional(),
  ...annotationBodyFields,
};

/**
 * `POST /api/evaluations`: the definitions inline (the same zod schemas as files check them,
 * in the run), and the options of `reckon estimate` under their JSON names, each checked by the
 * very schema that checks the command-line option, so the messages are the command line's.
 */
export const evaluationBodySchema = z
  .object({
    env: z.record(z.string(), z.unknown()),
    policy: z.record(z.string(), z.unknown()),
    env_name: nameSchema.optional(),
    policy_name: nameSchema.optional(),
    ...runOptionFields,
  })
  .strict();

export type EvaluationBody = z.infer<typeof evaluationBodySchema>;

export interface ServerLimits {
  /** Most episodes one request may ask for (also the cap of a target-error run). */
  readonly maxEpisodes: number;
  /** Worker threads each run uses. */
  readonly workers: number;
  /** Folder recorded as the definitions' base (they name no files, so it is never read). */
  readonly baseDir: string;
}

export interface EvaluationPlan {
  readonly spec: RolloutSpec;
  readonly options: StoredOptions;
  readonly annotations: Annotations;
}

/** The field of the form (or body) an InputError from this request belongs to. */
export function fieldOf(error: InputError, labels: { env: string; policy: string }): string | null {
  if (error.where === labels.env) return 'env';
  if (error.where === labels.policy) return 'policy';
  if (error.where.startsWith('--')) return error.where.slice(2).replace(/-/g, '_').replace(/^interval$|^ci$/, 'ci');
  return null;
}

export function parseBody(body: unknown): EvaluationBody {
  const result = evaluationBodySchema.safeParse(body ?? {});
  if (!result.success) throw zodInputError(result.error, body, 'request');
  return result.data;
}

/**
 * Episodes and target error as the command line reads them (`runSize`), then held to the
 * server's cap; a target-error run without `episodes` is capped by the server's limit.
 */
export function serverRunSize(body: { episodes?: number; target_error?: number }, limits: ServerLimits): { episodes: number; targetError: number | null } {
  const size = runSize({ episodes: body.episodes?.toString(), 'target-error': body.target_error?.toString() });
  const capped = body.episodes === undefined && size.targetError !== null ? Math.min(size.episodes, limits.maxEpisodes) : size.episodes;
  if (capped > limits.maxEpisodes) {
    throw new InputError('--episodes', `this server runs at most ${limits.maxEpisodes} episodes a run (reckon serve --max-episodes); got ${capped}`);
  }
  return { episodes: capped, targetError: size.targetError };
}

/** A checked request body to a run's spec and stored options; throws InputError (HTTP 400). */
export function planEvaluation(body: EvaluationBody, seed: number, limits: ServerLimits): EvaluationPlan {
  refuseCodeAndPaths(body.env, 'env');
  refuseCodeAndPaths(body.policy, 'policy');
  const text = (v: number) => String(v);
  const { episodes, targetError } = serverRunSize(body, limits);
  const options: StoredOptions = {
    episodes,
    method: body.ci === undefined ? null : parseOption('ci', 'interval', body.ci),
    sigma: body.sigma === undefined ? null : parseOption('sigma', 'sigma', text(body.sigma)),
    level: body.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', text(body.confidence)),
    bounds: body.bounds === undefined ? null : parseOption('bounds', 'bounds', body.bounds.map(text).join(',')),
    targetError,
    workers: limits.workers,
  };
  const start = body.start === undefined ? null : parseOption('start', 'start', body.start);
  const spec: RolloutSpec = {
    env: { json: body.env, source: { label: body.env_name ?? 'env', baseDir: limits.baseDir } },
    policy: { json: body.policy, source: { label: body.policy_name ?? 'policy', baseDir: limits.baseDir } },
    seed: body.seed === undefined ? seed : parseOption('seed', 'seed', text(body.seed)),
    start,
    noise: noiseMode(body.noise, 'estimate', body.env),
  };
  return { spec, options, annotations: annotationsFromBody(body) };
}
