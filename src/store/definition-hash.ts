import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';

/**
 * A content hash of a definition that answers "same environment?" even after files change:
 * the definition's canonical JSON (keys sorted) plus, for every `"path"` it names (a module's
 * code, an epsilon policy's base file), that file's bytes, followed recursively for JSON files.
 */
export function definitionHash(json: unknown, baseDir: string): string {
  const hash = createHash('sha256');
  feed(hash, json, baseDir, new Set());
  return hash.digest('hex');
}

function feed(hash: ReturnType<typeof createHash>, json: unknown, baseDir: string, seen: Set<string>): void {
  hash.update(canonicalJson(json));
  visitPaths(json, (relative) => {
    const file = path.resolve(baseDir, relative);
    if (seen.has(file)) return;
    seen.add(file);
    let bytes: Buffer;
    try {
      bytes = readFileSync(file);
    } catch {
      hash.update(`\0missing:${relative}`);
      return;
    }
    hash.update(`\0file:${relative}\0`);
    hash.update(bytes);
    if (file.endsWith('.json')) {
      try {
        feed(hash, JSON.parse(bytes.toString('utf8')), path.dirname(file), seen);
      } catch {
        // Not valid JSON: its bytes are already in the hash.
      }
    }
  });
}

export function visitPaths(json: unknown, visit: (relative: string) => void): void {
  if (Array.isArray(json)) {
    for (const item of json) visitPaths(item, visit);
  } else if (json !== null && typeof json === 'object') {
    for (const [key, value] of Object.entries(json)) {
      if (key === 'path' && typeof value === 'string') visit(value);
      else if (key === 'command' && Array.isArray(value)) {
        // A process environment's program: its files are the arguments given relative to the definition.
        for (const arg of value) if (typeof arg === 'string' && (arg.startsWith('./') || arg.startsWith('../'))) visit(arg);
      } else visitPaths(value, visit);
    }
  }
}

/** JSON with object keys sorted, so equal definitions hash equally whatever their key order. */
export function canonicalJson(json: unknown): string {
  if (Array.isArray(json)) return `[${json.map(canonicalJson).join(',')}]`;
  if (json !== null && typeof json === 'object') {
    const entries = Object.entries(json).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
  }
  return JSON.stringify(json) ?? 'null';
}
