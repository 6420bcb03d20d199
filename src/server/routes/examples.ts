import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { namesCode } from '../../report/plots/exact-for-run.js';
import { PACKAGE_ROOT } from '../package-root.js';

interface Example {
  readonly name: string;
  readonly role: 'environment' | 'policy';
  readonly definition: unknown;
}

const ENVIRONMENT_KINDS = new Set(['gridworld', 'tabular']);

/** An epsilon policy's `base.path` replaced by the base file's contents, so the example is data only. */
function inlineBases(json: unknown, dir: string, depth = 0): unknown {
  if (json === null || typeof json !== 'object' || Array.isArray(json) || depth > 8) return json;
  const record = { ...(json as Record<string, unknown>) };
  const base = record.base as { path?: unknown } | undefined;
  if (base && typeof base.path === 'string') {
    const file = path.resolve(dir, base.path);
    record.base = inlineBases(JSON.parse(readFileSync(file, 'utf8')), path.dirname(file), depth + 1);
  }
  return record;
}

/** The bundled definitions that run without code (envs/ and envs/textbook/), for the page's form. */
export function bundledExamples(root = path.join(PACKAGE_ROOT, 'envs')): Example[] {
  const examples: Example[] = [];
  for (const folder of ['', 'textbook']) {
    const dir = path.join(root, folder);
    let files: string[];
    try {
      files = readdirSync(dir).filter((f) => f.endsWith('.json')).sort();
    } catch {
      continue;
    }
    for (const file of files) {
      try {
        const definition = inlineBases(JSON.parse(readFileSync(path.join(dir, file), 'utf8')), dir);
        if (namesCode(definition)) continue;
        const kind = (definition as { kind?: unknown }).kind;
        examples.push({ name: path.posix.join(folder, file), role: ENVIRONMENT_KINDS.has(String(kind)) ? 'environment' : 'policy', definition });
      } catch {
        // Not a definition (or a broken base reference): not offered.
      }
    }
  }
  return examples;
}

/** `GET /api/examples`: bundled environments and policies to start an evaluation from. */
export function exampleRoutes(app: FastifyInstance): void {
  const examples = bundledExamples();
  app.get('/api/examples', async () => examples);
}
