import Database from 'better-sqlite3';
import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { InputError } from '../errors.js';
import { MIGRATIONS, SCHEMA_VERSION } from './migrations.js';
import { rememberOpenedStore } from './damage.js';

export type Db = Database.Database;

/**
 * Opens (creating if needed) a run store: WAL so readers never block the writer, a busy
 * timeout so two writers take turns instead of failing, foreign keys on, and the schema brought
 * forward. A file that is not SQLite, not ours, or from a newer reckon is refused (exit 2)
 * without being modified.
 */
export function openStore(file: string, options: { readonly?: boolean } = {}): Db {
  const where = `store ${file}`;
  const exists = existsSync(file);
  if (!exists && options.readonly) throw new InputError(where, "does not exist yet: run 'reckon estimate' first, or give --store PATH");
  if (!exists) mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  let db: Db;
  try {
    db = new Database(file, { fileMustExist: exists });
  } catch (e) {
    throw new InputError(where, `cannot be opened: ${(e as Error).message}`);
  }
  try {
    db.pragma('busy_timeout = 10000');
    const version = readVersion(db, where);
    if (version > SCHEMA_VERSION) {
      throw new InputError(where, `was written by a newer reckon (store schema ${version}, this one knows up to ${SCHEMA_VERSION}); upgrade reckon to read it`);
    }
    db.pragma('journal_mode = WAL');
    db.pragma('foreign_keys = ON');
    db.pragma('synchronous = NORMAL');
    if (version < SCHEMA_VERSION) migrate(db, version);
    rememberOpenedStore(file);
    return db;
  } catch (e) {
    db.close();
    if (e instanceof InputError) throw e;
    const code = (e as { code?: string }).code ?? '';
    if (code === 'SQLITE_NOTADB' || code === 'SQLITE_CORRUPT') {
      throw new InputError(where, 'is not a reckon store (not an SQLite database); give another --store PATH');
    }
    throw e;
  }
}

function readVersion(db: Db, where: string): number {
  let tables: { name: string }[];
  try {
    tables = db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as { name: string }[];
  } catch (e) {
    throw new InputError(where, `is not a reckon store (${(e as Error).message}); give another --store PATH`);
  }
  const names = new Set(tables.map((t) => t.name));
  if (names.size === 0) return 0;
  if (!names.has('reckon_schema')) {
    throw new InputError(where, 'is an SQLite database but not a reckon store; give another --store PATH');
  }
  const row = db.prepare('SELECT version FROM reckon_schema').get() as { version: number } | undefined;
  if (!row) throw new InputError(where, 'is a damaged reckon store (no schema version); give another --store PATH');
  return row.version;
}

function migrate(db: Db, from: number): void {
  const apply = db.transaction(() => {
    // Re-read inside the write transaction: another process may have migrated meanwhile.
    const current = (db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'reckon_schema'").get()
      ? (db.prepare('SELECT version FROM reckon_schema').get() as { version: number }).version
      : 0);
    if (current >= SCHEMA_VERSION) return;
    if (current === 0 && from === 0) db.exec('CREATE TABLE reckon_schema (version INTEGER NOT NULL); INSERT INTO reckon_schema VALUES (0);');
    for (let v = current; v < SCHEMA_VERSION; v++) db.exec(MIGRATIONS[v]);
    db.prepare('UPDATE reckon_schema SET version = ?').run(SCHEMA_VERSION);
  });
  apply.immediate();
}
