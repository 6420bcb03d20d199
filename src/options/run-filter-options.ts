import { z } from 'zod';
import { InputError } from '../errors.js';
import { labelKeySchema, labelValueSchema } from './annotation-options.js';

/**
 * The filters that find stored runs (`runs list`, `runs delete`, `GET /api/runs`): one set of
 * rules for the command line and the API. Dates are UTC, as the store keeps them.
 */
export const RUN_STATUSES = ['running', 'done', 'interrupted', 'failed'] as const;
export const RUN_KINDS = ['estimate', 'comparison', 'offpolicy'] as const;

/** `KEY=VALUE` (that value) or `KEY` (any value). */
export const labelFilterSchema = z
  .string()
  .transform((s) => (s.includes('=') ? { key: s.slice(0, s.indexOf('=')).trim(), value: s.slice(s.indexOf('=') + 1).trim() as string | null } : { key: s.trim(), value: null }))
  .pipe(z.object({ key: labelKeySchema, value: labelValueSchema.nullable() }));

const listOf = <T extends string>(values: readonly [T, ...T[]], what: string) =>
  z
    .string()
    .transform((s) => s.split(',').map((p) => p.trim()).filter(Boolean))
    .pipe(z.array(z.enum(values, { message: `must be ${what}: ${values.join(', ')} (several with commas)` })).min(1, { message: `must name at least one of ${values.join(', ')}` }));

const DAY = /^\d{4}-\d{2}-\d{2}$/;
const RELATIVE = /^(\d+(?:\.\d+)?)\s*(h|d|w)$/;

/**
 * A point in time: a date (`2026-11-02`, its start; as `--until`, its end, so the day is
 * included), a date and time (`2026-11-02T14:30`, UTC unless it names a zone), or a span back
 * from now (`36h`, `7d`, `2w`).
 */
function timeSchema(edge: 'since' | 'until', now: () => Date) {
  return z.string().transform((text, ctx) => {
    const t = text.trim();
    const relative = RELATIVE.exec(t);
    if (relative) {
      const hours = Number(relative[1]) * { h: 1, d: 24, w: 24 * 7 }[relative[2] as 'h' | 'd' | 'w'];
      return new Date(now().getTime() - hours * 3600_000).toISOString();
    }
    if (DAY.test(t)) {
      const start = new Date(`${t}T00:00:00Z`);
      if (!Number.isNaN(start.getTime()) && start.toISOString().startsWith(t)) {
        return edge === 'since' ? start.toISOString() : new Date(start.getTime() + 86_400_000).toISOString();
      }
    } else if (/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(t)) {
      const withZone = /(Z|[+-]\d{2}:?\d{2})$/.test(t) ? t : `${t}Z`;
      const at = new Date(withZone.replace(' ', 'T'));
      if (!Number.isNaN(at.getTime())) return at.toISOString();
    }
    ctx.addIssue({ code: 'custom', message: 'must be a date (2026-11-02), a date and time (2026-11-02T14:30, UTC) or a span back from now (36h, 7d, 2w)' });
    return z.NEVER;
  });
}

export function runFilterSchemas(now: () => Date = () => new Date()) {
  return {
    label: labelFilterSchema,
    since: timeSchema('since', now),
    until: timeSchema('until', now),
    status: listOf(RUN_STATUSES, 'a run status'),
    kind: listOf(RUN_KINDS, 'a run kind'),
    text: z.string().trim().min(1, { message: 'needs some text to look for' }),
    policy: z.string().trim().min(1, { message: 'needs part of a policy name' }),
    envHash: z.string().trim().regex(/^[0-9a-f]{1,64}$/, { message: 'must be (the start of) a hex definition hash, as runs list --json shows it' }),
  } as const;
}

/** What the filters chose, before the store is asked. */
export interface RunFilterChoice {
  readonly labels: readonly { key: string; value: string | null }[];
  readonly since: string | null;
  readonly until: string | null;
  readonly statuses: readonly (typeof RUN_STATUSES)[number][] | null;
  readonly kinds: readonly (typeof RUN_KINDS)[number][] | null;
  readonly text: string | null;
  readonly policy: string | null;
  readonly envHash: string | null;
}

/** The filters' texts as the command line (`--name`) or the API (`?name=`) gives them. */
export interface RunFilterTexts {
  label?: readonly string[];
  since?: string;
  until?: string;
  status?: string;
  kind?: string;
  text?: string;
  policy?: string;
  envHash?: string;
}

/** Checks every filter; a bad one is an InputError naming it as `spell(name)` (e.g. `--since` or `?since`). */
export function parseRunFilter(texts: RunFilterTexts, spell: (name: string) => string, now?: () => Date): RunFilterChoice {
  const schemas = runFilterSchemas(now);
  const one = <K extends keyof typeof schemas>(key: K, name: string, text: string | undefined): z.output<(typeof schemas)[K]> | null => {
    if (text === undefined) return null;
    const result = schemas[key].safeParse(text);
    if (!result.success) throw new InputError(spell(name), `${result.error.issues[0]?.message ?? 'is not valid'} (got "${text}")`);
    return result.data as z.output<(typeof schemas)[K]>;
  };
  const choice: RunFilterChoice = {
    labels: (texts.label ?? []).map((t) => one('label', 'label', t)!),
    since: one('since', 'since', texts.since),
    until: one('until', 'until', texts.until),
    statuses: one('status', 'status', texts.status),
    kinds: one('kind', 'kind', texts.kind),
    text: one('text', 'text', texts.text),
    policy: one('policy', 'policy', texts.policy),
    envHash: one('envHash', 'env-hash', texts.envHash),
  };
  if (choice.since && choice.until && choice.since >= choice.until) {
    throw new InputError(spell('until'), `is not after --since (${choice.since} … ${choice.until}): nothing could match`);
  }
  return choice;
}
