import path from 'node:path';
import type { Db } from './open.js';

/** Runs of one definition file whose environment hash is not the file's current one. */
export interface OlderVersion {
  readonly hash: string;
  readonly runIds: readonly string[];
  /** The newest of these runs, ISO time. */
  readonly lastUsed: string;
}

/**
 * The stored runs whose environment was read from `file` (absolute) but hashed differently
 * from `currentHash`: runs of an older (or later edited) version of that file. A run knows
 * its file from the files it recorded, or, stored before those were recorded, from the folder
 * and name it was given as.
 */
export function olderVersionsOf(db: Db, file: string, currentHash: string): OlderVersion[] {
  const rows = db
    .prepare("SELECT id, env_hash, env_label, env_base_dir, files_json, created_at FROM runs WHERE env_hash != ? AND parent_id IS NULL AND (files_json LIKE ? ESCAPE '\\' OR env_base_dir = ?) ORDER BY created_at DESC")
    .all(currentHash, `%${JSON.stringify(file).slice(1, -1).replace(/[\\%_]/g, (c) => `\\${c}`)}%`, path.dirname(file)) as {
    id: string;
    env_hash: string;
    env_label: string;
    env_base_dir: string;
    files_json: string | null;
    created_at: string;
  }[];
  const byHash = new Map<string, { ids: string[]; lastUsed: string }>();
  for (const row of rows) {
    const files = row.files_json ? (JSON.parse(row.files_json) as { role: string; path: string }[]) : [];
    const recorded = files.find((f) => f.role === 'environment');
    const same = recorded ? recorded.path === file : path.resolve(row.env_base_dir, path.basename(row.env_label)) === file;
    if (!same) continue;
    const entry = byHash.get(row.env_hash) ?? { ids: [], lastUsed: row.created_at };
    entry.ids.push(row.id);
    byHash.set(row.env_hash, entry);
  }
  return [...byHash].map(([hash, e]) => ({ hash, runIds: e.ids, lastUsed: e.lastUsed }));
}
