import { InputError } from '../errors.js';

/**
 * A request's query string as named options, checked against the names a route knows (the
 * access token is the gate's business, not the route's): an unknown name is a 400 that says
 * which names exist, as an unknown command-line option is.
 */
export function queryOptions(query: unknown, known: readonly string[], repeatable: readonly string[] = []): Record<string, string | undefined> {
  const result: Record<string, string | undefined> = {};
  for (const [key, value] of Object.entries((query ?? {}) as Record<string, unknown>)) {
    if (key === 'token') continue;
    if (!known.includes(key)) {
      throw new InputError(`?${key}`, `is not an option here; use ${known.length ? known.join(', ') : 'none'}`);
    }
    if (repeatable.includes(key) && Array.isArray(value)) continue; // read with queryList
    if (typeof value !== 'string') throw new InputError(`?${key}`, 'is given more than once');
    result[key] = value;
  }
  return result;
}

/** Every value of a query option that may repeat (`?event=a&event=b`), in order; empty when absent. */
export function queryList(query: unknown, key: string): string[] {
  const value = ((query ?? {}) as Record<string, unknown>)[key];
  if (value === undefined) return [];
  const values = Array.isArray(value) ? value : [value];
  if (!values.every((v) => typeof v === 'string')) throw new InputError(`?${key}`, 'must be text');
  return values as string[];
}
