import { z } from 'zod';
import { InputError } from '../errors.js';

/**
 * Labels (`--label KEY=VALUE`) and notes (`--note TEXT`) on stored runs: one set of rules for
 * the command line, `runs label`/`runs note` and the HTTP API. A key is a short word people
 * type again to find runs (`--label release=v2`), so it is kept to letters, digits and `._-`.
 */
export const LABEL_KEY = /^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/;

export const labelKeySchema = z.string().regex(LABEL_KEY, {
  message: 'a label key is 1 to 64 letters, digits, ".", "_" or "-", starting with a letter or digit',
});

export const labelValueSchema = z
  .string()
  .min(1, { message: 'a label needs a value after "=", e.g. reported=yes' })
  .max(200, { message: 'a label value is at most 200 characters' })
  .refine((v) => !/[\r\n]/.test(v), { message: 'a label value is one line' });

export const labelSchema = z
  .string()
  .refine((s) => s.includes('='), { message: 'must be KEY=VALUE, e.g. --label reported=yes' })
  .transform((s) => [s.slice(0, s.indexOf('=')).trim(), s.slice(s.indexOf('=') + 1).trim()] as const)
  .pipe(z.tuple([labelKeySchema, labelValueSchema]));

export const noteSchema = z
  .string()
  .transform((s) => s.trim())
  .pipe(z.string().min(1, { message: 'a note needs some text' }).max(10_000, { message: 'a note is at most 10,000 characters' }));

/** `KEY=VALUE` texts as a map (a key given twice keeps its last value); bad ones name the option. */
export function parseLabels(where: string, texts: readonly string[] | undefined): Record<string, string> {
  const labels: Record<string, string> = {};
  for (const text of texts ?? []) {
    const result = labelSchema.safeParse(text);
    if (!result.success) throw new InputError(where, `${result.error.issues[0]?.message ?? 'is not valid'} (got "${text}")`);
    labels[result.data[0]] = result.data[1];
  }
  return labels;
}

export function parseNote(where: string, text: string | undefined): string | null {
  if (text === undefined) return null;
  const result = noteSchema.safeParse(text);
  if (!result.success) throw new InputError(where, result.error.issues[0]?.message ?? 'is not valid');
  return result.data;
}

/** What a run is created with, from `--label` and `--note`. */
export interface Annotations {
  readonly labels: Readonly<Record<string, string>>;
  readonly note: string | null;
}

export function annotationsFrom(values: { label?: string[]; note?: string }): Annotations {
  return { labels: parseLabels('--label', values.label), note: parseNote('--note', values.note) };
}

/** The same labels and note in an HTTP request body: `"labels": {"k": "v"}, "note": "…"`. */
export const annotationBodyFields = {
  labels: z.record(labelKeySchema, labelValueSchema).optional(),
  note: noteSchema.optional(),
};

export function annotationsFromBody(body: { labels?: Record<string, string>; note?: string }): Annotations {
  return { labels: body.labels ?? {}, note: body.note ?? null };
}
