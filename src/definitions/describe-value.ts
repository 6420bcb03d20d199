/** Short, quotable renderings of user values and numbers for one-line error messages. */

/** A number as people write it: 12 significant digits, so 0.1 + 0.2 prints as 0.3. */
export function formatNumber(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Number(x.toPrecision(12)));
}

/** A value for "(got ...)": numbers and short strings verbatim, containers by kind. */
export function describeValue(value: unknown): string {
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (typeof value === 'number') return formatNumber(value);
  if (typeof value === 'boolean') return String(value);
  if (typeof value === 'string') {
    const shown = value.length > 40 ? `${value.slice(0, 37)}...` : value;
    return JSON.stringify(shown);
  }
  if (Array.isArray(value)) return 'an array';
  if (typeof value === 'function') return 'a function';
  return 'an object';
}

/** `"a", "b", "c" and 4 more`: the first few names of a list, quoted. */
export function listNames(names: readonly string[], shown = 3): string {
  const quoted = names.slice(0, shown).map((n) => JSON.stringify(n));
  const rest = names.length - quoted.length;
  return rest > 0 ? `${quoted.join(', ')} and ${rest} more` : quoted.join(', ');
}
