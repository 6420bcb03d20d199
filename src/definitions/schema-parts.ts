/** Building blocks shared by the environment and policy schemas, each with a message a person can act on. */
import { z } from 'zod';
import { describeValue } from './describe-value.js';
import { unknownKeysMessage } from './issues.js';

/** A strict object whose unknown-key error suggests the nearest known key. */
export function strictObject<T extends z.ZodRawShape>(shape: T) {
  const known = Object.keys(shape);
  return z.strictObject(shape, {
    error: (issue) => (issue.code === 'unrecognized_keys' ? unknownKeysMessage(issue.keys, known) : undefined),
  });
}

function checkedNumber(accept: (v: number) => boolean, requirement: string) {
  // abort: a bad number stops the cross-field checks, which would only report its consequences
  return z.number().refine(accept, {
    abort: true,
    error: (issue) => `must be ${requirement} (got ${describeValue(issue.input)})`,
  });
}

export const probabilitySchema = checkedNumber((v) => v >= 0 && v <= 1, 'between 0 and 1');
export const discountSchema = checkedNumber((v) => v > 0 && v <= 1, 'in (0, 1]');
export const horizonSchema = checkedNumber((v) => Number.isInteger(v) && v >= 1, 'an integer of at least 1');
export const toleranceSchema = checkedNumber((v) => v > 0, 'greater than 0');
export const weightSchema = checkedNumber((v) => v >= 0, 'at least 0');
export const epsilonSchema = probabilitySchema;

/** Tolerance on a probability distribution's sum (the definition formats' contract). */
export const SUM_TOLERANCE = 1e-9;

/** Fields every definition may carry for people and reports. */
export const describedFields = {
  name: z.string().optional(),
  description: z.string().optional(),
};

/** One user-perceived character (a code point), as layouts and arrow pictures use them. */
export function characters(text: string): string[] {
  return Array.from(text);
}

export function isSingleCharacter(text: string): boolean {
  return characters(text).length === 1;
}

export const optionsSchema = z.record(z.string(), z.unknown()).default({});
