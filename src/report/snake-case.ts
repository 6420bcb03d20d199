/**
 * JSON that reckon writes spells its keys in snake_case. A few objects were first written
 * with camelCase keys (a stored run's summary: `ci.halfWidth`, `ci.anytimeValid`); scripts may
 * read those, so they stay as aliases beside the snake_case keys, never instead of them.
 */
export function withSnakeCaseKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(withSnakeCaseKeys);
  if (value === null || typeof value !== 'object') return value;
  const out: Record<string, unknown> = {};
  for (const [key, item] of Object.entries(value)) {
    const converted = withSnakeCaseKeys(item);
    out[key] = converted;
    const snake = snakeCase(key);
    if (snake !== key && !(snake in value)) out[snake] = converted;
  }
  return out;
}

export function snakeCase(key: string): string {
  return key.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
}
