import { z } from 'zod';
import { InputError } from '../errors.js';
import { MAX_SEED } from '../engine/streams.js';
import { CI_METHODS } from '../stats/interval.js';
import { SEQUENCE_METHODS } from '../evaluate/sequence.js';
import { NOISE_MODES } from '../engine/noise.js';

/**
 * Zod schemas for command-line option values: the same rules will validate the HTTP API's
 * bodies, so each option is checked in exactly one place.
 */

const integerText = (min: number, max: number, what: string) =>
  z
    .string()
    .regex(/^\s*-?\d+\s*$/, { message: `must be a whole number (${what})` })
    .transform((s) => Number(s))
    .refine((n) => n >= min && n <= max, { message: `must be between ${min} and ${max} (${what})` });

const positiveNumberText = (what: string) =>
  z
    .string()
    .transform((s) => Number(s))
    .refine((n) => Number.isFinite(n) && n > 0, { message: `must be a positive number (${what})` });

const DURATION_UNITS: Record<string, number> = { '': 1, s: 1, m: 60, min: 60, h: 3600, d: 86400 };

/** A duration as a number of seconds, or with a unit: 45s, 30m, 2h, 1.5d. */
const durationText = (what: string) =>
  z
    .string()
    .regex(/^\s*\d+(\.\d+)?\s*(s|m|min|h|d)?\s*$/, { message: `must be a duration such as 90s, 30m, 2h or 1.5d (${what})` })
    .transform((s) => {
      const [, value, , unit = ''] = s.trim().match(/^(\d+(\.\d+)?)\s*(s|m|min|h|d)?$/)!;
      return Number(value) * DURATION_UNITS[unit];
    })
    .refine((n) => n > 0, { message: `must be longer than 0 (${what})` });

export const optionSchemas = {
  episodes: integerText(2, 1e12, 'episodes to run, at least 2'),
  seed: integerText(0, MAX_SEED, 'any whole number from 0'),
  workers: integerText(1, 1024, 'worker threads'),
  confidence: z
    .string()
    .transform((s) => Number(s))
    .refine((n) => Number.isFinite(n) && n > 0 && n < 1, { message: 'must be a level between 0 and 1, e.g. 0.95' }),
  ci: z.enum(CI_METHODS, { message: `must be one of ${CI_METHODS.join(', ')}` }),
  interval: z.enum([...CI_METHODS, ...SEQUENCE_METHODS], { message: `must be one of ${[...CI_METHODS, ...SEQUENCE_METHODS].join(', ')}` }),
  sigma: positiveNumberText('the returns\' sub-Gaussian scale'),
  bounds: z
    .string()
    .transform((s) => s.split(',').map((p) => Number(p.trim())))
    .refine((p) => p.length === 2 && p.every(Number.isFinite) && p[0] < p[1], {
      message: 'must be LOW,HIGH with LOW < HIGH, e.g. --bounds -10,5',
    })
    .transform((p) => [p[0], p[1]] as [number, number]),
  targetError: positiveNumberText('the half-width to reach'),
  start: z.string().min(1, { message: 'must name a state' }),
  stepTimeout: positiveNumberText('seconds one plug-in call may take'),
  seedCost: durationText('what training one more seed costs'),
  limit: integerText(1, 1e6, 'how many runs to list'),
  noise: z.enum(NOISE_MODES, { message: `must be one of ${NOISE_MODES.join(', ')} (how draws are keyed: by step, or by state visit)` }),
} as const;

/** Parses one option's text with its schema; a bad value is an InputError naming the option. */
export function parseOption<K extends keyof typeof optionSchemas>(
  name: string,
  key: K,
  text: string,
): z.output<(typeof optionSchemas)[K]> {
  const result = optionSchemas[key].safeParse(text);
  if (!result.success) {
    const message = result.error.issues[0]?.message ?? 'is not valid';
    throw new InputError(`--${name}`, `${message} (got "${text}")`);
  }
  return result.data as z.output<(typeof optionSchemas)[K]>;
}
