/**
 * Loads the default export of a user's module (`"kind": "module"`), resolving its path
 * against the definition file's folder. Node 20 cannot import TypeScript, so a `.ts`
 * module that fails to load gets advice instead of Node's bare error code.
 */
import { existsSync } from 'node:fs';
import { extname, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { InputError } from '../errors.js';
import type { DefinitionSource } from './built.js';

const TYPESCRIPT = new Set(['.ts', '.mts', '.cts', '.tsx']);

/** Explains why importing `path` failed, in one line. */
export function explainImportFailure(path: string, error: unknown): string {
  const code = (error as { code?: unknown } | null)?.code;
  const why = error instanceof Error ? error.message : String(error);
  if (TYPESCRIPT.has(extname(path)) && (code === 'ERR_UNKNOWN_FILE_EXTENSION' || /Unknown file extension/.test(why))) {
    return `cannot import TypeScript module "${path}" on Node 20; compile it to .js (for example with tsc) and point "path" at the .js file, or run with a TypeScript loader`;
  }
  return `could not load module "${path}": ${why}`;
}

/** The module's default export, checked to be a function (a factory). */
export async function importFactory(
  relativePath: string,
  source: DefinitionSource,
  what: 'environment' | 'policy',
): Promise<(...args: never[]) => unknown> {
  const absolute = resolve(source.baseDir, relativePath);
  if (!existsSync(absolute)) {
    throw new InputError(source.label, `module "${relativePath}" not found (looked for ${absolute})`);
  }
  let loaded: { default?: unknown };
  try {
    loaded = (await import(pathToFileURL(absolute).href)) as { default?: unknown };
  } catch (e) {
    throw new InputError(source.label, explainImportFailure(relativePath, e), { cause: e });
  }
  if (typeof loaded.default !== 'function') {
    const expected = what === 'environment' ? '(options) => environment' : '(options, context) => policy';
    throw new InputError(
      source.label,
      `module "${relativePath}" must have a default export that is a function ${expected} (found ${typeof loaded.default})`,
    );
  }
  return loaded.default as (...args: never[]) => unknown;
}
