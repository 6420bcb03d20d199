/**
 * Module hooks (node:module `register`) that let a `"kind": "module"` definition point at a
 * TypeScript file with no build step. A `.ts` or `.mts` file is stripped of its types by
 * TypeScript's `transpileModule` (no type check: type errors are the editor's business, not
 * a run's) and loaded as an ES module from its own URL, so its relative and package imports
 * resolve exactly as a `.js` file's would. The output is cached on disk under a hash of the
 * source, the compiler version and the options, so the compiler (a few MB to load) is only
 * started for a file that changed. A syntax error names the file, line and column.
 *
 * This file runs on Node's hooks thread; it must not import the rest of reckon.
 */
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { homedir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

type Resolve = (specifier: string, context: { parentURL?: string }) => Promise<{ url: string; format?: string | null }>;
type Load = (url: string, context: { format?: string | null }) => Promise<{ format: string; source?: string | ArrayBuffer | Uint8Array | null }>;

const TYPESCRIPT = /\.m?ts$/;
/** Bumped when the compile options below change, so old cache entries are not reused. */
const OPTIONS_KEY = 'esm-es2022-v1';

/** `./helper.js` written in a .ts file, as TypeScript's own convention has it, finds `./helper.ts`. */
export async function resolve(specifier: string, context: { parentURL?: string }, next: Resolve) {
  try {
    return await next(specifier, context);
  } catch (error) {
    const parent = context.parentURL ?? '';
    if ((error as { code?: string }).code === 'ERR_MODULE_NOT_FOUND' && TYPESCRIPT.test(parent) && /^\.{1,2}\/.*\.m?js$/.test(specifier)) {
      return await next(specifier.replace(/(\.m?)js$/, '$1ts'), context);
    }
    throw error;
  }
}

export async function load(url: string, context: { format?: string | null }, next: Load) {
  if (!url.startsWith('file:') || !TYPESCRIPT.test(url)) return next(url, context);
  const file = fileURLToPath(url);
  const source = readFileSync(file, 'utf8');
  return { format: 'module', source: await compiled(file, source), shortCircuit: true };
}

async function compiled(file: string, source: string): Promise<string> {
  const key = createHash('sha256').update(`${compilerVersion()}\0${OPTIONS_KEY}\0${source}`).digest('hex');
  const cached = path.join(cacheDir(), `${key}.mjs`);
  try {
    return readFileSync(cached, 'utf8');
  } catch {
    // not compiled yet
  }
  const ts = await typescript();
  const out = ts.transpileModule(source, {
    fileName: file,
    reportDiagnostics: true,
    compilerOptions: {
      module: ts.ModuleKind.ESNext,
      target: ts.ScriptTarget.ES2022,
      sourceMap: false,
      inlineSourceMap: true,
      inlineSources: true,
    },
  });
  const errors = (out.diagnostics ?? []).filter((d) => d.category === ts.DiagnosticCategory.Error);
  if (errors.length > 0) {
    const d = errors[0];
    const where = d.file && d.start !== undefined ? d.file.getLineAndCharacterOfPosition(d.start) : null;
    const position = where ? `:${where.line + 1}:${where.character + 1}` : '';
    const message = ts.flattenDiagnosticMessageText(d.messageText, ' ');
    const more = errors.length > 1 ? ` (and ${errors.length - 1} more syntax error${errors.length > 2 ? 's' : ''})` : '';
    throw new SyntaxError(`${path.basename(file)}${position}: ${message}${more}`);
  }
  try {
    mkdirSync(path.dirname(cached), { recursive: true });
    const partial = `${cached}.${process.pid}.tmp`;
    writeFileSync(partial, out.outputText);
    renameSync(partial, cached); // atomic: a reader never sees half a file
  } catch {
    // an unwritable cache only costs a compile next time
  }
  return out.outputText;
}

/** RECKON_CACHE_DIR, else the user's cache folder. */
function cacheDir(): string {
  const base = process.env.RECKON_CACHE_DIR ?? path.join(process.env.XDG_CACHE_HOME ?? path.join(homedir(), '.cache'), 'reckon');
  return path.join(base, 'typescript');
}

/** The compiler's version, read from its package.json without loading the compiler. */
function compilerVersion(): string {
  const manifest = createRequire(import.meta.url).resolve('typescript/package.json');
  return (JSON.parse(readFileSync(manifest, 'utf8')) as { version: string }).version;
}

let compiler: typeof import('typescript') | null = null;

async function typescript(): Promise<typeof import('typescript')> {
  compiler ??= ((await import('typescript')) as unknown as { default: typeof import('typescript') }).default;
  return compiler;
}
