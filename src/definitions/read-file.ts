/**
 * Reading a definition file: bytes to JSON, with errors that say which file and where.
 * Kept apart from parsing (JSON to a typed definition) so HTTP bodies skip this step.
 */
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { InputError } from '../errors.js';
import type { DefinitionSource } from './built.js';
import { findJsonSyntaxError, lineColumnAt } from './json-syntax.js';

export interface DefinitionFile {
  readonly json: unknown;
  readonly source: DefinitionSource;
}

/**
 * Reads and JSON-parses `path`; `source.label` is `path` exactly as given (or `label`,
 * for files found through another file, named relative to where the user stands).
 */
export function readDefinitionFile(path: string, label: string = path): DefinitionFile {
  const source: DefinitionSource = { label, baseDir: dirname(resolve(path)), file: resolve(path) };
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError(label, describeReadFailure(e), { cause: e });
  }
  return { json: parseJsonText(text, label), source };
}

function describeReadFailure(e: unknown): string {
  const code = (e as NodeJS.ErrnoException).code;
  if (code === 'ENOENT') return 'no such file';
  if (code === 'EISDIR') return 'is a directory, not a file';
  if (code === 'EACCES' || code === 'EPERM') return 'cannot read the file (permission denied)';
  return `cannot read the file: ${(e as Error).message}`;
}

/** Parses JSON text, reporting an empty text or the first syntax error with its line and column. */
export function parseJsonText(text: string, label: string): unknown {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') throw new InputError(label, 'the file is empty (expected a JSON object)');
  try {
    return JSON.parse(body);
  } catch (e) {
    const found = findJsonSyntaxError(body);
    if (!found) throw new InputError(label, `invalid JSON: ${(e as Error).message}`, { cause: e });
    const { line, column } = lineColumnAt(body, found.offset);
    throw new InputError(label, `invalid JSON at line ${line}, column ${column}: ${found.message}`, { cause: e });
  }
}
