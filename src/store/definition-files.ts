import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { visitPaths } from './definition-hash.js';

/** One file a run was defined by, and its content hash when the run started (null: missing). */
export interface DefinitionFileHash {
  readonly role: 'environment' | 'policy';
  /** Absolute path. */
  readonly path: string;
  readonly sha256: string | null;
}

function sha256Of(file: string): string | null {
  try {
    return createHash('sha256').update(readFileSync(file)).digest('hex');
  } catch {
    return null;
  }
}

/**
 * Every file a definition was read from: the file itself (when it came from one) and every
 * file it names through `"path"`, followed through JSON files, each with its hash, so that
 * a resumed run can name the one file that changed.
 */
export function definitionFiles(role: DefinitionFileHash['role'], file: string | null, json: unknown, baseDir: string): DefinitionFileHash[] {
  const files: DefinitionFileHash[] = [];
  const seen = new Set<string>();
  const add = (absolute: string): string | null => {
    if (seen.has(absolute)) return null;
    seen.add(absolute);
    const sha256 = sha256Of(absolute);
    files.push({ role, path: absolute, sha256 });
    return sha256;
  };
  const follow = (definition: unknown, dir: string) =>
    visitPaths(definition, (relative) => {
      const absolute = path.resolve(dir, relative);
      if (add(absolute) === null || !absolute.endsWith('.json')) return;
      try {
        follow(JSON.parse(readFileSync(absolute, 'utf8')), path.dirname(absolute));
      } catch {
        // Not valid JSON: its hash is recorded, which is all a resume needs.
      }
    });
  if (file !== null) add(path.resolve(file));
  follow(json, baseDir);
  return files;
}

/** The first recorded file whose content is no longer what it was, or null when all agree. */
export function firstChangedFile(files: readonly DefinitionFileHash[]): { file: DefinitionFileHash; now: 'changed' | 'missing' | 'back' } | null {
  for (const file of files) {
    const now = sha256Of(file.path);
    if (now === file.sha256) continue;
    return { file, now: now === null ? 'missing' : file.sha256 === null ? 'back' : 'changed' };
  }
  return null;
}

/** A path as the user would type it from here: relative when below the working folder. */
export function displayPath(absolute: string): string {
  const relative = path.relative(process.cwd(), absolute);
  return relative && !relative.startsWith('..') && !path.isAbsolute(relative) ? relative : absolute;
}
