/**
 * Off-policy runs in the store: an ordinary runs row (kind 'offpolicy', done at once, the
 * report's JSON as its summary) and the log it read, by hash and size, with every episode's
 * weight. Written in one transaction, so a run is stored whole or not at all.
 */
import type { Db } from './open.js';
import { createRun, finishRun, type StoredDefinition } from './runs.js';

export interface StoredLog {
  readonly label: string;
  readonly sha256: string;
  readonly bytes: number;
  readonly episodes: number;
  readonly steps: number;
}

export interface NewOffPolicyRun {
  readonly env: StoredDefinition | null;
  readonly policy: StoredDefinition;
  readonly log: StoredLog;
  readonly seed: number;
  readonly options: Record<string, unknown>;
  readonly toolVersion: string;
  readonly machine: Record<string, unknown>;
  readonly seconds: number;
  readonly weights: Float64Array;
  /** The report as `offpolicy --json` prints it (without its run id). */
  readonly summary: Record<string, unknown>;
  readonly labels?: Readonly<Record<string, string>>;
  readonly note?: string | null;
}

/** Stands in for the environment of a run that had none: the log itself. */
function logAsEnvironment(log: StoredLog): StoredDefinition {
  return { label: log.label, json: null, baseDir: '', hash: log.sha256 };
}

export function storeOffPolicyRun(db: Db, run: NewOffPolicyRun): string {
  return db.transaction(() => {
    const id = createRun(db, {
      kind: 'offpolicy',
      env: run.env ?? logAsEnvironment(run.log),
      policy: run.policy,
      seed: run.seed,
      start: null,
      noise: 'step',
      firstEpisode: 0,
      episodesRequested: run.log.episodes,
      options: run.options,
      facts: { log: run.log },
      toolVersion: run.toolVersion,
      machine: run.machine,
      labels: run.labels,
      note: run.note,
    });
    db.prepare('INSERT INTO offpolicy_logs (run_id, label, sha256, bytes, episodes, steps, weights) VALUES (?, ?, ?, ?, ?, ?, ?)').run(
      id,
      run.log.label,
      run.log.sha256,
      run.log.bytes,
      run.log.episodes,
      run.log.steps,
      Buffer.from(run.weights.buffer, run.weights.byteOffset, run.weights.byteLength),
    );
    db.prepare('UPDATE runs SET episodes_done = ?, steps = ?, seconds = ? WHERE id = ?').run(run.log.episodes, run.log.steps, run.seconds, id);
    finishRun(db, id, 'done', { ...run.summary, run_id: id });
    return id;
  })();
}

export interface OffPolicyLogRecord extends StoredLog {
  readonly weights: Float64Array;
}

/** The log an off-policy run read and its episodes' weights; null for other runs. */
export function loadOffPolicyLog(db: Db, runId: string): OffPolicyLogRecord | null {
  const row = db.prepare('SELECT label, sha256, bytes, episodes, steps, weights FROM offpolicy_logs WHERE run_id = ?').get(runId) as
    | { label: string; sha256: string; bytes: number; episodes: number; steps: number; weights: Buffer }
    | undefined;
  if (!row) return null;
  const copy = Buffer.from(row.weights);
  const weights = new Float64Array(copy.buffer, copy.byteOffset, copy.byteLength / 8);
  return { label: row.label, sha256: row.sha256, bytes: row.bytes, episodes: row.episodes, steps: row.steps, weights };
}
