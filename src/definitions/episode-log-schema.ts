/**
 * The logged-episode format (JSON Lines, one object a line): an optional header line, then
 * one line a decision step. The one schema the reader, the recorder and the docs share.
 */
import { z } from 'zod';
import { describeValue } from './describe-value.js';
import { discountSchema, horizonSchema, strictObject } from './schema-parts.js';

/** A state or action as logged: a name, a number, or any JSON value (matched by its JSON text). */
const labelSchema = z.union([z.string(), z.number(), z.boolean(), z.array(z.unknown()), z.record(z.string(), z.unknown())], {
  error: 'must be a name, a number or a JSON value (not null)',
});

const finite = (what: string) =>
  z.number({ error: (issue) => `must be a number (got ${describeValue(issue.input)})` }).refine(Number.isFinite, {
    error: `${what} must be finite`,
  });

export const rewardBoundsSchema = z
  .tuple([finite('a bound'), finite('a bound')], { error: 'must be [lowest, highest] reward of a step' })
  .refine(([lo, hi]) => lo <= hi, { error: 'must be [lowest, highest] with lowest ≤ highest' });

export const logHeaderSchema = strictObject({
  kind: z.literal('header'),
  format: z.literal('reckon-episodes').optional(),
  version: z.literal(1).optional(),
  discount: discountSchema.optional(),
  reward_bounds: rewardBoundsSchema.optional(),
  horizon: horizonSchema.optional(),
  actions: z.array(labelSchema).min(1, { error: 'must name at least one action' }).optional(),
  /** Free text: which system and behaviour policy wrote the log. */
  description: z.string().optional(),
});
export type LogHeader = z.output<typeof logHeaderSchema>;

/** 0 < p ≤ 1: an action the behaviour could never take was never logged. */
export const behaviourProbSchema = z
  .number({ error: (issue) => `must be a number (got ${describeValue(issue.input)})` })
  .refine((p) => p > 0 && p <= 1, {
    error: (issue) => `must be in (0, 1] (got ${describeValue(issue.input)}): the behaviour policy's probability of the logged action`,
  });

const distributionEntrySchema = z
  .number({ error: (issue) => `must be a number (got ${describeValue(issue.input)})` })
  .refine((p) => p >= 0 && p <= 1, { error: (issue) => `must be between 0 and 1 (got ${describeValue(issue.input)})` });

export const END_KINDS = ['terminal', 'truncated'] as const;
export type EndKind = (typeof END_KINDS)[number];

export const logStepSchema = strictObject({
  kind: z.literal('step').optional(),
  episode: z.union([z.string().min(1), z.number().int()], { error: 'must be a name or an integer' }),
  t: z
    .number({ error: (issue) => `must be a whole number ≥ 0 (got ${describeValue(issue.input)})` })
    .refine((t) => Number.isInteger(t) && t >= 0, { error: (issue) => `must be a whole number ≥ 0 (got ${describeValue(issue.input)})` }),
  state: labelSchema,
  action: labelSchema,
  reward: finite('reward'),
  behaviour_prob: behaviourProbSchema,
  end: z.union([z.null(), z.enum(END_KINDS)], { error: 'must be null, "terminal" (the episode ended there) or "truncated" (cut off)' }),
  /** The behaviour's whole distribution: {action: p} or one number per header action. */
  behaviour_probs: z.union([z.record(z.string(), distributionEntrySchema), z.array(distributionEntrySchema)]).optional(),
  next_state: labelSchema.optional(),
});
export type LogStep = z.output<typeof logStepSchema>;

/** The name a logged state or action is matched by: a string as is, anything else as its JSON text. */
export function labelName(value: unknown): string {
  return typeof value === 'string' ? value : JSON.stringify(value);
}

const STEP_KEYS = new Set(['kind', 'episode', 't', 'state', 'action', 'reward', 'behaviour_prob', 'end', 'behaviour_probs', 'next_state']);
const isName = (v: unknown) => typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v));

/**
 * The common case of a step line, recognised without zod: names and numbers where
 * {@link logStepSchema} allows them, nothing exotic. Accepts only lines that schema accepts
 * (a test checks this), and returns null for anything else, which then goes through the
 * schema for its verdict and message. Parsing a million lines through zod costs about a second
 * more than this check.
 */
export function plainStep(json: Record<string, unknown>): LogStep | null {
  let keys = 0;
  for (const key in json) {
    if (!STEP_KEYS.has(key)) return null;
    keys++;
  }
  const { kind, episode, t, state, action, reward, behaviour_prob: p, end, behaviour_probs: probs, next_state: next } = json;
  if (kind !== undefined && kind !== 'step') return null;
  if (!((typeof episode === 'string' && episode.length > 0) || (typeof episode === 'number' && Number.isInteger(episode)))) return null;
  if (!(typeof t === 'number' && Number.isInteger(t) && t >= 0)) return null;
  if (!isName(state) || !isName(action)) return null;
  if (!(typeof reward === 'number' && Number.isFinite(reward))) return null;
  if (!(typeof p === 'number' && p > 0 && p <= 1)) return null;
  if (!(end === null || end === 'terminal' || end === 'truncated')) return null;
  if (probs !== undefined) {
    if (!Array.isArray(probs)) return null;
    for (const q of probs) if (!(typeof q === 'number' && q >= 0 && q <= 1)) return null;
  }
  if (next !== undefined && !isName(next)) return null;
  if (keys < 7) return null;
  return json as unknown as LogStep;
}
