/**
 * The store's schema, as forward migrations. A store records the version it is at; opening it
 * applies every later migration in one transaction. Never edit a migration once released:
 * add a new one.
 */
export const MIGRATIONS: readonly string[] = [
  // 1: runs and their episodes, a blob of returns and lengths per chunk of episodes.
  `
  CREATE TABLE runs (
    id                 TEXT PRIMARY KEY,
    kind               TEXT NOT NULL,
    status             TEXT NOT NULL CHECK (status IN ('running', 'done', 'interrupted', 'failed')),
    created_at         TEXT NOT NULL,
    finished_at        TEXT,
    env_label          TEXT NOT NULL,
    env_json           TEXT NOT NULL,
    env_hash           TEXT NOT NULL,
    env_base_dir       TEXT NOT NULL,
    policy_label       TEXT NOT NULL,
    policy_json        TEXT NOT NULL,
    policy_hash        TEXT NOT NULL,
    policy_base_dir    TEXT NOT NULL,
    seed               INTEGER NOT NULL,
    start_state        TEXT,
    first_episode      INTEGER NOT NULL,
    episodes_requested INTEGER NOT NULL,
    options_json       TEXT NOT NULL,
    facts_json         TEXT NOT NULL,
    tool_version       TEXT NOT NULL,
    machine_json       TEXT NOT NULL,
    episodes_done      INTEGER NOT NULL DEFAULT 0,
    steps              INTEGER NOT NULL DEFAULT 0,
    seconds            REAL NOT NULL DEFAULT 0,
    summary_json       TEXT,
    error              TEXT
  );
  CREATE TABLE episode_chunks (
    run_id  TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    first   INTEGER NOT NULL,
    count   INTEGER NOT NULL,
    returns BLOB NOT NULL,
    lengths BLOB NOT NULL,
    PRIMARY KEY (run_id, first)
  ) WITHOUT ROWID;
  CREATE INDEX runs_by_time ON runs (created_at);
  `,
  // 2: shards of one run split across machines, the process that owns a running run (so a
  // run whose process died can be resumed), and comparison runs that group per-policy runs.
  `
  ALTER TABLE runs ADD COLUMN shard_index INTEGER;
  ALTER TABLE runs ADD COLUMN shard_count INTEGER;
  ALTER TABLE runs ADD COLUMN total_episodes INTEGER;
  ALTER TABLE runs ADD COLUMN owner_pid INTEGER;
  ALTER TABLE runs ADD COLUMN owner_host TEXT;
  ALTER TABLE runs ADD COLUMN parent_id TEXT REFERENCES runs (id) ON DELETE CASCADE;
  CREATE INDEX runs_by_env_hash ON runs (env_hash);
  CREATE INDEX runs_by_parent ON runs (parent_id);
  `,
  // 3: when the owning process last said it is alive, so a run whose process died without a
  // word on another machine (where its process id means nothing) shows as interrupted; and
  // every file the run was defined by with its hash, so a resume can name the one that changed.
  `
  ALTER TABLE runs ADD COLUMN heartbeat_at TEXT;
  ALTER TABLE runs ADD COLUMN files_json TEXT;
  `,
  // 4: how a run's draws are keyed (engine/noise.ts); every earlier run keyed them by step.
  `
  ALTER TABLE runs ADD COLUMN noise TEXT NOT NULL DEFAULT 'step' CHECK (noise IN ('step', 'visit'));
  `,
  // 5: off-policy runs (kind 'offpolicy'): the log they read, identified by its hash and size,
  // and each episode's importance weight for the page's histogram. The figures are the run's
  // summary; no episodes are stored, since none were run.
  `
  CREATE TABLE offpolicy_logs (
    run_id   TEXT PRIMARY KEY REFERENCES runs (id) ON DELETE CASCADE,
    label    TEXT NOT NULL,
    sha256   TEXT NOT NULL,
    bytes    INTEGER NOT NULL,
    episodes INTEGER NOT NULL,
    steps    INTEGER NOT NULL,
    weights  BLOB NOT NULL
  ) WITHOUT ROWID;
  CREATE INDEX offpolicy_logs_by_hash ON offpolicy_logs (sha256);
  `,
  // 6: the state each episode of a finite environment ended in (int32 state indices, one per
  // episode), so terminal events can be counted again from the store. NULL for chunks of module
  // environments and for chunks stored before it was recorded.
  `
  ALTER TABLE episode_chunks ADD COLUMN finals BLOB;
  `,
  // 7: what people say about a run once it exists: labels (one value a key, set again to
  // change it) to find runs by, and notes (kept in the order they were added).
  `
  CREATE TABLE run_labels (
    run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    key    TEXT NOT NULL,
    value  TEXT NOT NULL,
    PRIMARY KEY (run_id, key)
  ) WITHOUT ROWID;
  CREATE INDEX run_labels_by_key ON run_labels (key, value);
  CREATE TABLE run_notes (
    run_id   TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    added_at TEXT NOT NULL,
    text     TEXT NOT NULL
  );
  CREATE INDEX run_notes_by_run ON run_notes (run_id);
  `,
];

export const SCHEMA_VERSION = MIGRATIONS.length;
