/** Option values of `offpolicy` (zod): one place for the command line and any HTTP body. */
import { z } from 'zod';
import { InputError } from '../errors.js';
import { ESTIMATORS, type EstimatorName } from '../offpolicy/evaluate-log.js';
import { MIN_RESAMPLES } from '../stats/bootstrap-resample.js';

export const offPolicyOptionSchemas = {
  estimator: z
    .string()
    .transform((s) => s.split(',').map((p) => p.trim().toLowerCase()))
    .refine((list) => list.length > 0 && list.every((e) => (ESTIMATORS as readonly string[]).includes(e)), {
      message: `must be one or more of ${ESTIMATORS.join(', ')}, separated by commas (or "all")`,
    })
    .transform((list) => [...new Set(list)] as EstimatorName[]),
  resamples: z
    .string()
    .regex(/^\s*\d+\s*$/, { message: 'must be a whole number' })
    .transform(Number)
    .refine((n) => n >= MIN_RESAMPLES && n <= 1e6, { message: `must be between ${MIN_RESAMPLES} and 1000000` }),
  folds: z
    .string()
    .regex(/^\s*\d+\s*$/, { message: 'must be a whole number' })
    .transform(Number)
    .refine((n) => n >= 2 && n <= 100, { message: 'must be between 2 and 100 (each fold\'s model is fitted on the others)' }),
} as const;

export function parseOffPolicyOption<K extends keyof typeof offPolicyOptionSchemas>(key: K, text: string): z.output<(typeof offPolicyOptionSchemas)[K]> {
  if (key === 'estimator' && text.trim().toLowerCase() === 'all') return [...ESTIMATORS] as z.output<(typeof offPolicyOptionSchemas)[K]>;
  const result = offPolicyOptionSchemas[key].safeParse(text);
  if (!result.success) throw new InputError(`--${key}`, `${result.error.issues[0]?.message ?? 'is not valid'} (got "${text}")`);
  return result.data as z.output<(typeof offPolicyOptionSchemas)[K]>;
}
