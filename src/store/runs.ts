import { randomBytes } from 'node:crypto';
import { hostname } from 'node:os';
import { InputError, NotFoundError } from '../errors.js';
import type { Db } from './open.js';
import { ownerAlive } from './owner.js';
import type { DefinitionFileHash } from './definition-files.js';
import { LEGACY_NOISE, NOISE_MODES, type NoiseMode } from '../engine/noise.js';
import { NO_FINAL_STATE } from '../engine/episode-block.js';
import { loadAnnotations, NO_ANNOTATIONS, setLabels, addNote, type RunNote } from './annotations.js';

export type RunStatus = 'running' | 'done' | 'interrupted' | 'failed';
export type RunKind = 'estimate' | 'comparison' | 'offpolicy';

/** A run's kind as messages say it, with its article: "an estimate run", "an off-policy run". */
export function runKindPhrase(kind: RunKind): string {
  return kind === 'estimate' ? 'an estimate run' : kind === 'offpolicy' ? 'an off-policy run' : 'a comparison run';
}

export interface StoredDefinition {
  readonly label: string;
  readonly json: unknown;
  readonly baseDir: string;
  readonly hash: string;
}

export interface ShardInfo {
  /** 1-based shard number K of M. */
  readonly index: number;
  readonly count: number;
  /** Episodes of the whole (unsharded) run. */
  readonly total: number;
}

export interface NewRun {
  readonly kind: RunKind;
  readonly env: StoredDefinition;
  readonly policy: StoredDefinition;
  readonly seed: number;
  readonly start: string | null;
  /** How the run's draws are keyed (engine/noise.ts). */
  readonly noise: NoiseMode;
  readonly firstEpisode: number;
  readonly episodesRequested: number;
  readonly options: Record<string, unknown>;
  readonly facts: unknown;
  readonly toolVersion: string;
  readonly machine: Record<string, unknown>;
  readonly shard?: ShardInfo | null;
  readonly parentId?: string | null;
  /** The files the definitions were read from, with their hashes (empty for inline definitions). */
  readonly files?: readonly DefinitionFileHash[];
  /** Labels and a note given when the run was started (`--label`, `--note`). */
  readonly labels?: Readonly<Record<string, string>>;
  readonly note?: string | null;
}

export interface RunRecord {
  readonly id: string;
  readonly kind: RunKind;
  /**
   * Where the run stands: a run recorded as running whose process has died (killed, a power
   * cut) reads as `interrupted`, since nothing will ever finish it but `runs resume`.
   */
  readonly status: RunStatus;
  readonly createdAt: string;
  readonly finishedAt: string | null;
  readonly env: StoredDefinition;
  readonly policy: StoredDefinition;
  readonly seed: number;
  readonly start: string | null;
  /** Runs stored before the mode was recorded used step-keyed noise. */
  readonly noise: NoiseMode;
  readonly firstEpisode: number;
  readonly episodesRequested: number;
  readonly options: Record<string, unknown>;
  readonly facts: unknown;
  readonly toolVersion: string;
  readonly machine: Record<string, unknown>;
  readonly episodesDone: number;
  readonly steps: number;
  readonly seconds: number;
  readonly summary: Record<string, unknown> | null;
  readonly error: string | null;
  readonly shard: ShardInfo | null;
  readonly ownerPid: number | null;
  readonly ownerHost: string | null;
  readonly heartbeatAt: string | null;
  readonly parentId: string | null;
  /** Null for runs stored before files were recorded. */
  readonly files: readonly DefinitionFileHash[] | null;
  /** Labels by key (`--label`, `runs label`). */
  readonly labels: Readonly<Record<string, string>>;
  /** Notes in the order they were added (`--note`, `runs note`). */
  readonly notes: readonly RunNote[];
}

interface RunRow {
  id: string;
  kind: RunKind;
  status: RunStatus;
  created_at: string;
  finished_at: string | null;
  env_label: string;
  env_json: string;
  env_hash: string;
  env_base_dir: string;
  policy_label: string;
  policy_json: string;
  policy_hash: string;
  policy_base_dir: string;
  seed: number;
  start_state: string | null;
  first_episode: number;
  episodes_requested: number;
  options_json: string;
  facts_json: string;
  tool_version: string;
  machine_json: string;
  episodes_done: number;
  steps: number;
  seconds: number;
  summary_json: string | null;
  error: string | null;
  shard_index: number | null;
  shard_count: number | null;
  total_episodes: number | null;
  owner_pid: number | null;
  owner_host: string | null;
  heartbeat_at: string | null;
  parent_id: string | null;
  files_json: string | null;
  noise: string;
}

const ID_ALPHABET = 'abcdefghijkmnpqrstuvwxyz23456789';

/** A short id that is easy to read aloud and type (no 0/o, 1/l). */
export function newRunId(): string {
  const bytes = randomBytes(8);
  let id = '';
  for (const b of bytes) id += ID_ALPHABET[b % ID_ALPHABET.length];
  return id;
}

export function createRun(db: Db, run: NewRun): string {
  const insert = db.prepare(`
    INSERT INTO runs (id, kind, status, created_at, env_label, env_json, env_hash, env_base_dir,
      policy_label, policy_json, policy_hash, policy_base_dir, seed, start_state, first_episode,
      episodes_requested, options_json, facts_json, tool_version, machine_json,
      shard_index, shard_count, total_episodes, owner_pid, owner_host, heartbeat_at, parent_id, files_json, noise)
    VALUES (@id, @kind, 'running', @created_at, @env_label, @env_json, @env_hash, @env_base_dir,
      @policy_label, @policy_json, @policy_hash, @policy_base_dir, @seed, @start_state, @first_episode,
      @episodes_requested, @options_json, @facts_json, @tool_version, @machine_json,
      @shard_index, @shard_count, @total_episodes, @owner_pid, @owner_host, @created_at, @parent_id, @files_json, @noise)`);
  for (let attempt = 0; ; attempt++) {
    const id = newRunId();
    try {
      insert.run({
        id,
        kind: run.kind,
        created_at: new Date().toISOString(),
        env_label: run.env.label,
        env_json: JSON.stringify(run.env.json),
        env_hash: run.env.hash,
        env_base_dir: run.env.baseDir,
        policy_label: run.policy.label,
        policy_json: JSON.stringify(run.policy.json),
        policy_hash: run.policy.hash,
        policy_base_dir: run.policy.baseDir,
        seed: run.seed,
        start_state: run.start,
        first_episode: run.firstEpisode,
        episodes_requested: run.episodesRequested,
        options_json: JSON.stringify(run.options),
        facts_json: JSON.stringify(run.facts),
        tool_version: run.toolVersion,
        machine_json: JSON.stringify(run.machine),
        shard_index: run.shard?.index ?? null,
        shard_count: run.shard?.count ?? null,
        total_episodes: run.shard?.total ?? null,
        owner_pid: process.pid,
        owner_host: hostname(),
        parent_id: run.parentId ?? null,
        files_json: JSON.stringify(run.files ?? []),
        // A caller from plain JavaScript may leave the mode out: it then ran step-keyed.
        noise: run.noise ?? LEGACY_NOISE,
      });
      if (run.labels && Object.keys(run.labels).length > 0) setLabels(db, id, run.labels);
      if (run.note) addNote(db, id, run.note);
      return id;
    } catch (e) {
      if ((e as { code?: string }).code === 'SQLITE_CONSTRAINT_PRIMARYKEY' && attempt < 5) continue;
      throw e;
    }
  }
}

/** Little-endian bytes of a typed array, copied out of its (possibly larger) buffer. */
function bytesOf(array: Float64Array | Uint32Array | Int32Array): Buffer {
  return Buffer.from(array.buffer, array.byteOffset, array.byteLength);
}

/**
 * Commits one chunk of finished episodes and the run's counters in one transaction, so a run
 * killed at any moment keeps exactly the chunks whose transactions completed.
 */
export function appendChunk(
  db: Db,
  runId: string,
  chunk: { first: number; returns: Float64Array; lengths: Uint32Array; finals?: Int32Array | null },
  steps: number,
  seconds: number,
): void {
  const insert = db.prepare('INSERT INTO episode_chunks (run_id, first, count, returns, lengths, finals) VALUES (?, ?, ?, ?, ?, ?)');
  // A module environment's episodes have no final state index: nothing is stored for them.
  const finals = chunk.finals && chunk.finals.length === chunk.returns.length && chunk.finals.length > 0 && chunk.finals[0] !== NO_FINAL_STATE ? bytesOf(chunk.finals) : null;
  const update = db.prepare('UPDATE runs SET episodes_done = episodes_done + ?, steps = steps + ?, seconds = ?, heartbeat_at = ? WHERE id = ?');
  db.transaction(() => {
    insert.run(runId, chunk.first, chunk.returns.length, bytesOf(chunk.returns), bytesOf(chunk.lengths), finals);
    update.run(chunk.returns.length, steps, seconds, new Date().toISOString(), runId);
  })();
}

export function finishRun(db: Db, runId: string, status: RunStatus, summary: unknown = null, error: string | null = null): void {
  db.prepare('UPDATE runs SET status = ?, finished_at = ?, summary_json = ?, error = ?, owner_pid = NULL WHERE id = ?').run(
    status,
    new Date().toISOString(),
    summary === null ? null : JSON.stringify(summary),
    error,
    runId,
  );
}

/** Marks a run as running again under this process (resume). */
export function claimRun(db: Db, runId: string): void {
  db.prepare("UPDATE runs SET status = 'running', owner_pid = ?, owner_host = ?, heartbeat_at = ?, finished_at = NULL, error = NULL WHERE id = ?").run(
    process.pid,
    hostname(),
    new Date().toISOString(),
    runId,
  );
}

/** Records that this process still runs these runs (between chunk commits, which record it too). */
export function recordHeartbeat(db: Db, runIds: readonly string[]): void {
  const update = db.prepare("UPDATE runs SET heartbeat_at = ? WHERE id = ? AND status = 'running'");
  const now = new Date().toISOString();
  db.transaction(() => {
    for (const id of runIds) update.run(now, id);
  })();
}

/**
 * Keeps recording heartbeats for the given runs every `seconds` until the returned function
 * is called; the timer never keeps the process alive on its own. A heartbeat that cannot be
 * written (the store busy past its timeout) is skipped: the next chunk commit records one
 * too, and a thrown timer callback would end the whole run without its report.
 */
export function keepHeartbeat(db: Db, runIds: () => readonly string[], seconds: number): () => void {
  const timer = setInterval(() => {
    const ids = runIds();
    if (ids.length === 0 || !db.open) return;
    try {
      recordHeartbeat(db, ids);
    } catch (e) {
      if (!String((e as { code?: string }).code ?? '').startsWith('SQLITE_BUSY')) throw e;
    }
  }, seconds * 1000);
  timer.unref();
  return () => clearInterval(timer);
}

/** Rows as records, with their labels and notes. */
function recordsOf(db: Db, rows: readonly RunRow[]): RunRecord[] {
  const annotations = loadAnnotations(db, rows.map((r) => r.id));
  return rows.map((row) => toRecord(row, annotations.get(row.id) ?? NO_ANNOTATIONS));
}

function toRecord(row: RunRow, annotations: { labels: Readonly<Record<string, string>>; notes: readonly RunNote[] }): RunRecord {
  return {
    id: row.id,
    kind: row.kind,
    status: row.status === 'running' && !ownerAlive({ pid: row.owner_pid, host: row.owner_host, heartbeatAt: row.heartbeat_at }) ? 'interrupted' : row.status,
    createdAt: row.created_at,
    finishedAt: row.finished_at,
    env: { label: row.env_label, json: JSON.parse(row.env_json), baseDir: row.env_base_dir, hash: row.env_hash },
    policy: { label: row.policy_label, json: JSON.parse(row.policy_json), baseDir: row.policy_base_dir, hash: row.policy_hash },
    seed: row.seed,
    start: row.start_state,
    firstEpisode: row.first_episode,
    episodesRequested: row.episodes_requested,
    options: JSON.parse(row.options_json),
    facts: JSON.parse(row.facts_json),
    toolVersion: row.tool_version,
    machine: JSON.parse(row.machine_json),
    episodesDone: row.episodes_done,
    steps: row.steps,
    seconds: row.seconds,
    summary: row.summary_json === null ? null : JSON.parse(row.summary_json),
    error: row.error,
    shard: row.shard_index === null || row.shard_count === null ? null : { index: row.shard_index, count: row.shard_count, total: row.total_episodes ?? 0 },
    ownerPid: row.owner_pid,
    ownerHost: row.owner_host,
    heartbeatAt: row.heartbeat_at,
    parentId: row.parent_id,
    files: row.files_json === null ? null : JSON.parse(row.files_json),
    noise: storedNoise(row.noise),
    labels: annotations.labels,
    notes: annotations.notes,
  };
}

/** The stored mode, read defensively: anything unknown (a hand-edited store) counts as the legacy mode. */
function storedNoise(value: string | null | undefined): NoiseMode {
  return (NOISE_MODES as readonly string[]).includes(value ?? '') ? (value as NoiseMode) : LEGACY_NOISE;
}

export function findRun(db: Db, id: string): RunRecord | null {
  const row = db.prepare('SELECT * FROM runs WHERE id = ?').get(id) as RunRow | undefined;
  return row ? recordsOf(db, [row])[0] : null;
}

export function getRun(db: Db, id: string, storeLabel: string): RunRecord {
  const run = findRun(db, id);
  if (!run) throw new NotFoundError(`run ${id}`, `no such run in ${storeLabel}; see the ids with 'reckon runs list'`);
  return run;
}

export interface RunFilter {
  readonly envHash?: string;
  /** Exact environment hashes (`--env FILE`: the file's definition as it is now). */
  readonly envHashes?: readonly string[];
  readonly policy?: string;
  readonly limit?: number;
  readonly parentId?: string | null;
  /** Every one must match: a key with that value, or (value null) with any value. */
  readonly labels?: readonly { key: string; value: string | null }[];
  /** ISO times: created at or after `since`, before `until`. */
  readonly since?: string | null;
  readonly until?: string | null;
  /** As runs read (a run whose process died reads as interrupted). */
  readonly statuses?: readonly RunStatus[] | null;
  readonly kinds?: readonly RunKind[] | null;
  /** A part of a note, of the environment's or policy's name, or of a definition file's path. */
  readonly text?: string | null;
}

function likeAnywhere(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/**
 * Runs newest first; `envHash` matches a prefix, `policy` a part of the policy's label, `text`
 * a part of any note or name (case-insensitive for ASCII, as SQLite's LIKE is).
 */
export function listRuns(db: Db, filter: RunFilter = {}): RunRecord[] {
  const where: string[] = [];
  const params: unknown[] = [];
  if (filter.envHash) {
    where.push("env_hash LIKE ? ESCAPE '\\'");
    params.push(`${filter.envHash.replace(/[\\%_]/g, (c) => `\\${c}`)}%`);
  }
  if (filter.envHashes) {
    where.push(`env_hash IN (${filter.envHashes.map(() => '?').join(',') || "''"})`);
    params.push(...filter.envHashes);
  }
  if (filter.policy) {
    where.push("policy_label LIKE ? ESCAPE '\\'");
    params.push(likeAnywhere(filter.policy));
  }
  if (filter.parentId !== undefined) {
    where.push(filter.parentId === null ? 'parent_id IS NULL' : 'parent_id = ?');
    if (filter.parentId !== null) params.push(filter.parentId);
  }
  for (const label of filter.labels ?? []) {
    where.push(`EXISTS (SELECT 1 FROM run_labels l WHERE l.run_id = runs.id AND l.key = ?${label.value === null ? '' : ' AND l.value = ?'})`);
    params.push(label.key, ...(label.value === null ? [] : [label.value]));
  }
  if (filter.since) {
    where.push('created_at >= ?');
    params.push(filter.since);
  }
  if (filter.until) {
    where.push('created_at < ?');
    params.push(filter.until);
  }
  if (filter.kinds) {
    where.push(`kind IN (${filter.kinds.map(() => '?').join(',')})`);
    params.push(...filter.kinds);
  }
  if (filter.statuses) {
    // A run recorded as running may read as interrupted (its process is gone): decided below.
    const stored = new Set<string>(filter.statuses);
    if (stored.has('interrupted')) stored.add('running');
    where.push(`status IN (${[...stored].map(() => '?').join(',')})`);
    params.push(...stored);
  }
  if (filter.text) {
    const like = likeAnywhere(filter.text);
    where.push(`(env_label LIKE ?1 ESCAPE '\\' OR policy_label LIKE ?1 ESCAPE '\\' OR files_json LIKE ?1 ESCAPE '\\'
      OR EXISTS (SELECT 1 FROM run_notes n WHERE n.run_id = runs.id AND n.text LIKE ?1 ESCAPE '\\'))`.replace(/\?1/g, '?'));
    params.push(like, like, like, like);
  }
  const limit = filter.limit ?? 20;
  const sql = `SELECT * FROM runs ${where.length ? `WHERE ${where.join(' AND ')}` : ''} ORDER BY created_at DESC, rowid DESC${filter.statuses ? '' : ' LIMIT ?'}`;
  if (!filter.statuses) params.push(limit);
  const rows = db.prepare(sql).all(...params) as RunRow[];
  if (!filter.statuses) return recordsOf(db, rows);
  const statuses = new Set<string>(filter.statuses);
  const out: RunRecord[] = [];
  // Status as read needs each row's owner; read them in pages until the limit is reached.
  for (let start = 0; start < rows.length && out.length < limit; start += 200) {
    for (const run of recordsOf(db, rows.slice(start, start + 200))) if (statuses.has(run.status) && out.length < limit) out.push(run);
  }
  return out;
}

/**
 * Refuses to touch a run whose process is still running it (resume would run its episodes
 * twice, delete would pull its rows from under it); names the process so it can be stopped.
 */
export function refuseIfLive(run: RunRecord, what: string): void {
  if (run.status !== 'running') return;
  const where = run.ownerHost && run.ownerHost !== hostname() ? ` on ${run.ownerHost}` : '';
  throw new InputError(`run ${run.id}`, `is still running (process ${run.ownerPid}${where}); stop it first (Ctrl-C, or kill ${run.ownerPid}), or wait for it, then ${what}`);
}

/** A comparison's member runs (one estimate run per policy), in the order of its policies. */
export function listMembers(db: Db, parentId: string): RunRecord[] {
  return recordsOf(db, db.prepare('SELECT * FROM runs WHERE parent_id = ?').all(parentId) as RunRow[])
    .sort((x, y) => Number(x.options.policyIndex) - Number(y.options.policyIndex));
}

export function deleteRun(db: Db, id: string): boolean {
  return db.prepare('DELETE FROM runs WHERE id = ?').run(id).changes > 0;
}

/** A run's stored episodes in episode order. */
export interface StoredEpisodes {
  readonly returns: Float64Array;
  readonly lengths: Uint32Array;
  /**
   * The state index each episode ended in; null when any chunk lacks them (a module
   * environment, or episodes stored before final states were recorded).
   */
  readonly finals: Int32Array | null;
}

/** Every stored episode of a run in episode order (checked to be one contiguous range). */
export function loadEpisodes(db: Db, run: RunRecord): StoredEpisodes {
  const rows = db
    .prepare('SELECT first, count, returns, lengths, finals FROM episode_chunks WHERE run_id = ? ORDER BY first')
    .all(run.id) as { first: number; count: number; returns: Buffer; lengths: Buffer; finals: Buffer | null }[];
  const total = rows.reduce((n, r) => n + r.count, 0);
  const returns = new Float64Array(total);
  const lengths = new Uint32Array(total);
  let finals: Int32Array | null = rows.every((r) => r.finals !== null && r.finals.length === r.count * 4) ? new Int32Array(total) : null;
  let expected = run.firstEpisode;
  let offset = 0;
  for (const row of rows) {
    if (row.first !== expected) throw new Error(`run ${run.id}: stored episodes jump from ${expected} to ${row.first}`);
    // Copy out: SQLite's buffers need not be aligned for a typed-array view.
    new Uint8Array(returns.buffer, offset * 8, row.count * 8).set(row.returns);
    new Uint8Array(lengths.buffer, offset * 4, row.count * 4).set(row.lengths);
    if (finals) new Uint8Array(finals.buffer, offset * 4, row.count * 4).set(row.finals!);
    offset += row.count;
    expected += row.count;
  }
  if (total === 0) finals = null;
  return { returns, lengths, finals };
}

/** Finished shard runs of a store (or one given run, for re-reading after a merge). */
export function listRunsForMerge(db: Db, id?: string): RunRecord[] {
  const rows = id
    ? (db.prepare('SELECT * FROM runs WHERE id = ?').all(id) as RunRow[])
    : (db.prepare("SELECT * FROM runs WHERE shard_count IS NOT NULL AND status = 'done' AND kind = 'estimate' ORDER BY shard_index").all() as RunRow[]);
  return recordsOf(db, rows);
}
