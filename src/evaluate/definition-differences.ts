/**
 * Where two definitions differ, as short lines (`discount: 0.95 → 0.9`, `cells["~"].slip:
 * 0.3 → 0.4`), so a comparison across environment versions can name what changed. At most
 * `limit` lines; the last says how many more there are.
 */
export function definitionDifferences(before: unknown, after: unknown, limit = 8): string[] {
  const out: string[] = [];
  walk(before, after, '', out);
  if (out.length === 0) return ['the definitions read the same; a file they name (a module, a base policy) differs'];
  return out.length > limit ? [...out.slice(0, limit - 1), `and ${out.length - limit + 1} more differences`] : out;
}

function show(value: unknown): string {
  if (value === undefined) return '(absent)';
  const text = JSON.stringify(value);
  return text.length > 40 ? `${text.slice(0, 37)}…` : text;
}

function key(path: string, name: string): string {
  return /^[A-Za-z_][A-Za-z0-9_]*$/.test(name) ? (path ? `${path}.${name}` : name) : `${path}[${JSON.stringify(name)}]`;
}

function walk(a: unknown, b: unknown, path: string, out: string[]): void {
  if (JSON.stringify(a) === JSON.stringify(b)) return;
  const bothObjects = a !== null && b !== null && typeof a === 'object' && typeof b === 'object' && Array.isArray(a) === Array.isArray(b);
  if (!bothObjects) {
    out.push(`${path || '(whole definition)'}: ${show(a)} → ${show(b)}`);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    for (let i = 0; i < Math.max(a.length, b.length); i++) walk(a[i], b[i], `${path}[${i}]`, out);
    return;
  }
  const x = a as Record<string, unknown>;
  const y = b as Record<string, unknown>;
  for (const name of [...new Set([...Object.keys(x), ...Object.keys(y)])].sort()) walk(x[name], y[name], key(path, name), out);
}
