/**
 * Turns zod's structured issues into the one-line messages the command line prints and
 * the HTTP layer returns: `<label>: <path> <message>`, with paths written the way a
 * person would point into the file (`cells["~"].slip`, `transitions[4].p`).
 */
import type { z } from 'zod';
import { InputError } from '../errors.js';
import { describeValue, formatNumber } from './describe-value.js';
import { didYouMean } from './suggest.js';

type Issue = z.core.$ZodIssue;
type PathKey = PropertyKey;

/** Parameters of a custom issue whose message already says where (no path prefix). */
export interface StandaloneParams {
  readonly standalone: true;
}

/** `cells["~"].slip`, `layout[2]`, `transitions[4].p`; the empty string for the root. */
export function formatPath(path: readonly PathKey[]): string {
  let text = '';
  for (const key of path) {
    if (typeof key === 'number') text += `[${key}]`;
    else if (typeof key === 'string' && /^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key)) text += text ? `.${key}` : key;
    else text += `[${JSON.stringify(String(key))}]`;
  }
  return text;
}

/** The value at `path` inside `input`, or undefined when the path leads nowhere. */
export function valueAt(input: unknown, path: readonly PathKey[]): unknown {
  let value = input;
  for (const key of path) {
    if (value === null || typeof value !== 'object') return undefined;
    value = (value as Record<PropertyKey, unknown>)[key];
  }
  return value;
}

/** One line naming the first problem (unknown keys first: a misspelt key explains the rest). */
export function describeIssues(issues: readonly Issue[], input: unknown, base: readonly PathKey[] = []): string {
  return describeIssue(prioritise(issues)[0], input, base);
}

/** `<label>: <first problem>` for a failed parse. */
export function formatZodError(error: z.ZodError, input: unknown, label: string): string {
  return `${label}: ${describeIssues(error.issues, input)}`;
}

/** The InputError for a failed parse: exit code 2, HTTP 400. */
export function zodInputError(error: z.ZodError, input: unknown, label: string): InputError {
  return new InputError(label, describeIssues(error.issues, input), { cause: error });
}

function prioritise(issues: readonly Issue[]): Issue[] {
  const rank = (issue: Issue): number => (issue.code === 'unrecognized_keys' ? 0 : 1);
  return [...issues].sort((a, b) => rank(a) - rank(b));
}

function withPath(path: readonly PathKey[], text: string): string {
  const where = formatPath(path);
  return where ? `${where} ${text}` : text;
}

function describeIssue(issue: Issue, input: unknown, base: readonly PathKey[]): string {
  const path = [...base, ...issue.path];
  const value = valueAt(input, path);
  switch (issue.code) {
    case 'custom':
      if ((issue.params as Partial<StandaloneParams> | undefined)?.standalone) return issue.message;
      return withPath(path, issue.message);
    case 'unrecognized_keys': {
      const text = issue.message.startsWith('Unrecognized key') ? unknownKeys(issue.keys) : issue.message;
      const where = formatPath(path);
      return where ? `${where}: ${text}` : text;
    }
    case 'invalid_type':
      if (value === undefined) return withPath(path, 'is missing');
      return withPath(path, `must be ${typeName(issue.expected)} (got ${describeValue(value)})`);
    case 'invalid_value':
      return withPath(
        path,
        `must be ${issue.values.map((v) => JSON.stringify(v)).join(' or ')} (got ${describeValue(value)})`,
      );
    case 'too_small':
      return withPath(path, tooSmall(issue, value));
    case 'too_big':
      return withPath(path, tooBig(issue, value));
    case 'invalid_union':
      return describeUnion(issue, input, path, value);
    default:
      return withPath(path, issue.message);
  }
}

function unknownKeys(keys: readonly string[]): string {
  return keys.length === 1 ? `unknown key "${keys[0]}"` : `unknown keys ${keys.map((k) => `"${k}"`).join(', ')}`;
}

/** Message for a strict object's unknown keys, with a did-you-mean from the object's own keys. */
export function unknownKeysMessage(keys: readonly string[], known: readonly string[]): string {
  return keys.map((k) => `unknown key "${k}"${didYouMean(k, known)}`).join(', ');
}

function typeName(expected: string): string {
  switch (expected) {
    case 'int':
      return 'an integer';
    case 'object':
    case 'record':
      return 'an object';
    case 'array':
    case 'tuple':
      return 'an array';
    default:
      return /^[aeiou]/.test(expected) ? `an ${expected}` : `a ${expected}`;
  }
}

function tooSmall(issue: z.core.$ZodIssueTooSmall, value: unknown): string {
  const min = Number(issue.minimum);
  if (issue.origin === 'array' || issue.origin === 'set') return `must have at least ${min} entr${min === 1 ? 'y' : 'ies'}`;
  if (issue.origin === 'string') return min === 1 ? 'must not be empty' : `must have at least ${min} characters`;
  const bound = issue.inclusive ? `at least ${formatNumber(min)}` : `greater than ${formatNumber(min)}`;
  return `must be ${bound} (got ${describeValue(value)})`;
}

function tooBig(issue: z.core.$ZodIssueTooBig, value: unknown): string {
  const max = Number(issue.maximum);
  if (issue.origin === 'array' || issue.origin === 'set') return `must have at most ${max} entr${max === 1 ? 'y' : 'ies'}`;
  if (issue.origin === 'string') return `must have at most ${max} characters`;
  const bound = issue.inclusive ? `at most ${formatNumber(max)}` : `less than ${formatNumber(max)}`;
  return `must be ${bound} (got ${describeValue(value)})`;
}

/** zod v4 marks a discriminated union's failed lookup with a `note` its issue type does not declare. */
function unionNote(issue: z.core.$ZodIssueInvalidUnion): string | undefined {
  return (issue as { note?: string }).note;
}

/** True when a union branch rejected the value outright (wrong type or wrong discriminator), not a detail inside it. */
function rejectedAtRoot(issues: readonly Issue[]): boolean {
  return issues.some(
    (i) =>
      (i.path.length === 0 && (i.code === 'invalid_type' || i.code === 'unrecognized_keys')) ||
      (i.code === 'invalid_union' && unionNote(i) === 'No matching discriminator'),
  );
}

function describeUnion(
  issue: z.core.$ZodIssueInvalidUnion,
  input: unknown,
  path: readonly PathKey[],
  value: unknown,
): string {
  if (unionNote(issue) === 'No matching discriminator') {
    const options = (issue as { options?: unknown[] }).options?.map(String) ?? [];
    const listed = options.map((o) => `"${o}"`).join(', ');
    if (value === undefined) return withPath(path, `is missing (one of ${listed})`);
    const hint = typeof value === 'string' ? didYouMean(value, options) : '';
    return withPath(path, `must be one of ${listed} (got ${describeValue(value)})${hint}`);
  }
  const branches = issue.errors.filter((b) => b.length > 0);
  const matching = branches.find((b) => !rejectedAtRoot(b));
  if (matching) return describeIssues(matching, input, path);
  // An object with a "kind" meant to be the discriminated branch: say what is wrong with its kind.
  const discriminated = branches.find((b) => b.some((i) => i.code === 'invalid_union' && unionNote(i) !== undefined));
  const hasKind = value !== null && typeof value === 'object' && 'kind' in value;
  if (hasKind && discriminated) return describeIssues(discriminated, input, path);
  if (!issue.message.startsWith('Invalid input')) return withPath(path, `${issue.message} (got ${describeValue(value)})`);
  const chosen = branches[0];
  if (!chosen) return withPath(path, `is not valid (got ${describeValue(value)})`);
  return describeIssues(chosen, input, path);
}
