import type { Db } from './open.js';

/** A note on a run, with when it was added. */
export interface RunNote {
  readonly addedAt: string;
  readonly text: string;
}

export interface RunAnnotations {
  readonly labels: Readonly<Record<string, string>>;
  readonly notes: readonly RunNote[];
}

export const NO_ANNOTATIONS: RunAnnotations = { labels: {}, notes: [] };

/** Sets labels on a run; a key it already has takes the new value. */
export function setLabels(db: Db, runId: string, labels: Readonly<Record<string, string>>): void {
  const upsert = db.prepare('INSERT INTO run_labels (run_id, key, value) VALUES (?, ?, ?) ON CONFLICT (run_id, key) DO UPDATE SET value = excluded.value');
  db.transaction(() => {
    for (const [key, value] of Object.entries(labels)) upsert.run(runId, key, value);
  })();
}

/** Removes labels from a run by key; returns how many it had. */
export function removeLabels(db: Db, runId: string, keys: readonly string[]): number {
  const remove = db.prepare('DELETE FROM run_labels WHERE run_id = ? AND key = ?');
  let removed = 0;
  db.transaction(() => {
    for (const key of keys) removed += remove.run(runId, key).changes;
  })();
  return removed;
}

export function addNote(db: Db, runId: string, text: string): RunNote {
  const note = { addedAt: new Date().toISOString(), text };
  db.prepare('INSERT INTO run_notes (run_id, added_at, text) VALUES (?, ?, ?)').run(runId, note.addedAt, note.text);
  return note;
}

/** The labels and notes of some runs, in one query each, keyed by run id. */
export function loadAnnotations(db: Db, runIds: readonly string[]): Map<string, RunAnnotations> {
  const out = new Map<string, { labels: Record<string, string>; notes: RunNote[] }>();
  if (runIds.length === 0) return out;
  for (const id of runIds) out.set(id, { labels: {}, notes: [] });
  // Batches keep under SQLite's limit on bound parameters.
  for (let start = 0; start < runIds.length; start += 500) {
    const batch = runIds.slice(start, start + 500);
    const marks = batch.map(() => '?').join(',');
    const labels = db.prepare(`SELECT run_id, key, value FROM run_labels WHERE run_id IN (${marks}) ORDER BY key`).all(...batch) as { run_id: string; key: string; value: string }[];
    for (const row of labels) out.get(row.run_id)!.labels[row.key] = row.value;
    const notes = db.prepare(`SELECT run_id, added_at, text FROM run_notes WHERE run_id IN (${marks}) ORDER BY rowid`).all(...batch) as { run_id: string; added_at: string; text: string }[];
    for (const row of notes) out.get(row.run_id)!.notes.push({ addedAt: row.added_at, text: row.text });
  }
  return out;
}
