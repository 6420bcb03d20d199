/**
 * Loads the default export of a user's module (`"kind": "module"`), resolving its path
 * against the definition file's folder. A `.ts` or `.mts` module is compiled on the fly
 * (typescript-hooks.ts); `.tsx` and `.cts` get advice instead of Node's bare error code.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { register } from 'node:module';
import { extname, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { InputError } from '../errors.js';
import type { DefinitionSource } from './built.js';

const TYPESCRIPT = new Set(['.ts', '.mts', '.cts', '.tsx']);
const LOADABLE_TYPESCRIPT = new Set(['.ts', '.mts']);

let hooksRegistered = false;

/** Installs the TypeScript hooks on this thread (each worker thread needs its own). */
function registerTypeScriptHooks(): void {
  if (hooksRegistered) return;
  register(new URL('./typescript-hooks.js', import.meta.url));
  hooksRegistered = true;
}

/** Explains why importing `path` failed, in one line. */
export function explainImportFailure(path: string, error: unknown): string {
  const code = (error as { code?: unknown } | null)?.code;
  const why = error instanceof Error ? error.message : String(error);
  if (TYPESCRIPT.has(extname(path)) && (code === 'ERR_UNKNOWN_FILE_EXTENSION' || /Unknown file extension/.test(why))) {
    return `cannot import TypeScript module "${path}": reckon runs .ts and .mts modules (ES modules); rename it, or compile it to .js (for example with tsc) and point "path" at the .js file`;
  }
  if (error instanceof SyntaxError && TYPESCRIPT.has(extname(path))) return `syntax error in ${why}`;
  return `could not load module "${path}": ${why}`;
}

/**
 * Where a module's syntax error is (`line L, column C`): Node's import error does not say,
 * but its syntax check (`node --check`) prints the file, the line and a caret under the spot.
 * Run only after an import has already failed, so it costs nothing on the way that works.
 */
function syntaxErrorPlace(absolute: string): string | null {
  const asModule = extname(absolute) === '.cjs' ? [] : ['--experimental-default-type=module'];
  const checked = spawnSync(process.execPath, [...asModule, '--check', absolute], { encoding: 'utf8', timeout: 10_000 });
  const lines = (checked.stderr ?? '').split('\n');
  const at = /:(\d+)$/.exec(lines[0] ?? '');
  if (!at) return null;
  const caret = (lines[2] ?? '').indexOf('^');
  return caret >= 0 ? `line ${at[1]}, column ${caret + 1}` : `line ${at[1]}`;
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
  if (LOADABLE_TYPESCRIPT.has(extname(absolute))) registerTypeScriptHooks();
  try {
    loaded = (await import(pathToFileURL(absolute).href)) as { default?: unknown };
  } catch (e) {
    // A TypeScript module's syntax error already names its place (typescript-hooks.ts).
    const place = e instanceof SyntaxError && !TYPESCRIPT.has(extname(absolute)) ? syntaxErrorPlace(absolute) : null;
    const why = place ? `could not load module "${relativePath}": syntax error at ${place}: ${(e as Error).message}` : explainImportFailure(relativePath, e);
    throw new InputError(source.label, why, { cause: e });
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
