import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { CLI, FIXTURES, reckon, tempFiles } from '../cli/run-cli.js';
import { MIGRATIONS } from '../../src/store/migrations.js';

/**
 * The run store through the command line: what is stored comes back identical, a killed run
 * resumes to the figures of an uninterrupted one, shards merge to the unsharded run, old
 * stores migrate, foreign files are refused untouched, and two writers share one store.
 * Equality here is the store's own contract (same episodes → same figures), so the reference
 * is always a run of the same spec that never touched the store.
 */
const C = path.join(FIXTURES, 'textbook-samples');
const grid = ['--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json')];

/** A deliberately slow code environment (a busy loop per step), so a run lasts long enough to kill. */
const slowDir = tempFiles({
  'slow.json': { kind: 'module', path: './slow.js', options: {} },
  'uniform.json': { kind: 'uniform' },
  'slow.js': `export default () => ({
    actions: ['a', 'b'], discount: 0.95, horizon: 40, rewardBounds: [-1, 1],
    reset: (rng) => 0,
    step(state, action, rng, out) {
      let spin = 0; for (let i = 0; i < 3000; i++) spin += Math.sqrt(i);
      out.state = state + 1; out.reward = rng.uniform() * 2 - 1 + (spin < 0 ? 1 : 0);
      out.done = rng.uniform() < 0.05; return out;
    },
  });`,
});
const slow = ['--env', path.join(slowDir, 'slow.json'), '--policy', path.join(slowDir, 'uniform.json')];

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

function storeIn(dir: string, name = 'runs.sqlite'): string {
  return path.join(dir, name);
}

describe('round trip', () => {
  it('runs show recomputes exactly the figures estimate printed, and a re-analysis changes only the interval', () => {
    const store = storeIn(tempFiles({}));
    const est = json(reckon(['estimate', ...grid, '--episodes', '5000', '--seed', '3', '--store', store, '--json']));
    expect(est.run_id).toMatch(/^[a-z2-9]{8}$/);
    const shown = json(reckon(['runs', 'show', est.run_id, '--store', store, '--json']));
    for (const key of ['episodes', 'mean', 'std', 'stderr', 'ci', 'seed', 'horizon', 'truncation_bound', 'mean_length', 'min', 'max']) {
      expect(shown[key]).toStrictEqual(est[key]);
    }
    expect(shown.projection.map((p: { episodes_needed: number }) => p.episodes_needed)).toStrictEqual(est.projection.map((p: { episodes_needed: number }) => p.episodes_needed));
    expect(shown.status).toBe('done');
    const boot = json(reckon(['runs', 'show', est.run_id, '--store', store, '--ci', 'bootstrap', '--confidence', '0.9', '--json']));
    expect(boot.mean).toBe(est.mean);
    expect(boot.ci.method).toBe('bootstrap');
    expect(boot.ci.level).toBe(0.9);
    const csv = reckon(['runs', 'export', est.run_id, '--store', store, '--format', 'csv']).stdout.trim().split('\n');
    expect(csv[0]).toBe('episode,return,length');
    expect(csv).toHaveLength(5001);
    const exported = JSON.parse(reckon(['runs', 'export', est.run_id, '--store', store, '--format', 'json']).stdout);
    const mean = exported.returns.reduce((a: number, b: number) => a + b, 0) / exported.returns.length;
    expect(Math.abs(mean - est.mean)).toBeLessThan(1e-12);
    const listed = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(listed.map((r: { id: string }) => r.id)).toContain(est.run_id);
    expect(reckon(['runs', 'delete', est.run_id, '--store', store]).code).toBe(0);
    expect(json(reckon(['runs', 'list', '--store', store, '--json']))).toHaveLength(0);
  });

  it('an unknown run id: exit 2, the id and a hint', () => {
    const store = storeIn(tempFiles({}));
    reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--store', store]);
    const out = reckon(['runs', 'show', 'zzzzzzzz', '--store', store]);
    expect(out.code).toBe(2);
    expect(out.stderr).toContain('zzzzzzzz');
    expect(out.stderr).toContain('reckon runs list');
  });

  it('--no-store keeps nothing and reports run_id null', () => {
    const store = storeIn(tempFiles({}));
    const out = json(reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--no-store', '--json'], { env: { RECKON_STORE: store } }));
    expect(out.run_id).toBeNull();
    expect(reckon(['runs', 'list', '--store', store]).code).toBe(2); // never created
  });
});

function waitForEpisodes(store: string, atLeast: number, timeoutMs: number): Promise<void> {
  const started = Date.now();
  return new Promise((resolve, reject) => {
    const poll = () => {
      try {
        const db = new Database(store, { readonly: true, fileMustExist: true });
        const row = db.prepare('SELECT episodes_done FROM runs').get() as { episodes_done: number } | undefined;
        db.close();
        if (row && row.episodes_done >= atLeast) return resolve();
      } catch {
        // not created yet
      }
      if (Date.now() - started > timeoutMs) return reject(new Error('the run never committed episodes'));
      setTimeout(poll, 50);
    };
    poll();
  });
}

describe('crash safety', () => {
  const episodes = '30000';
  /** Enough to be killed part way (after 500), few enough to resume and repeat quickly. */
  const killedEpisodes = '8000';

  it('a run killed with SIGKILL keeps its committed chunks, and resume ends with the uninterrupted figures', async () => {
    const store = storeIn(tempFiles({}));
    const child = spawn(process.execPath, [CLI, 'estimate', ...slow, '--episodes', killedEpisodes, '--seed', '11', '--workers', '2', '--store', store, '--json'], {
      env: { ...process.env, RECKON_NO_PROGRESS: '1' },
      stdio: 'ignore',
    });
    await waitForEpisodes(store, 500, 30000);
    child.kill('SIGKILL');
    await new Promise((r) => child.on('exit', r));
    const db = new Database(store, { readonly: true });
    const row = db.prepare('SELECT id, status, episodes_done FROM runs').get() as { id: string; status: string; episodes_done: number };
    const chunked = db.prepare('SELECT SUM(count) AS n FROM episode_chunks').get() as { n: number };
    db.close();
    expect(row.status).toBe('running'); // nobody could mark it
    expect(row.episodes_done).toBeLessThan(Number(killedEpisodes));
    expect(chunked.n).toBe(row.episodes_done);
    // ...but its process is gone, so every reader sees it as interrupted.
    expect(json(reckon(['runs', 'show', row.id, '--store', store, '--json'])).status).toBe('interrupted');
    expect(json(reckon(['runs', 'list', '--store', store, '--json']))[0].status).toBe('interrupted');
    expect(reckon(['runs', 'list', '--store', store]).stdout).toMatch(new RegExp(`${row.id}.*interrupted`));

    const resumed = json(reckon(['runs', 'resume', row.id, '--store', store, '--json']));
    const reference = json(reckon(['estimate', ...slow, '--episodes', killedEpisodes, '--seed', '11', '--no-store', '--json']));
    expect(resumed.episodes).toBe(reference.episodes);
    expect(Math.abs(resumed.mean - reference.mean)).toBeLessThanOrEqual(1e-12 * Math.abs(reference.mean));
    expect(Math.abs(resumed.std - reference.std)).toBeLessThanOrEqual(1e-12 * reference.std);
    expect(resumed.ci).toStrictEqual(reference.ci);
    const shown = json(reckon(['runs', 'show', row.id, '--store', store, '--json']));
    expect(shown.status).toBe('done');
  }, 180_000); // a slow environment run twice (resumed, and the reference): minutes on a loaded machine

  it.each([
    ['SIGINT', 130],
    ['SIGTERM', 143],
  ] as const)('%s ends the run cleanly: episodes committed, status interrupted, how to resume, exit %i', async (signal, exitCode) => {
    const store = storeIn(tempFiles({}));
    const child = spawn(process.execPath, [CLI, 'estimate', ...slow, '--episodes', episodes, '--seed', '12', '--store', store], {
      env: { ...process.env, RECKON_NO_PROGRESS: '1' },
    });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    await waitForEpisodes(store, 200, 30000);
    child.kill(signal);
    const code = await new Promise((r) => child.on('exit', r));
    // 128 + the signal's number: the shell's convention for a process ended by a signal.
    expect(code).toBe(exitCode);
    expect(stderr).toMatch(/reckon runs resume [a-z2-9]{8}/);
    const db = new Database(store, { readonly: true });
    const row = db.prepare('SELECT id, status, episodes_done FROM runs').get() as { id: string; status: string; episodes_done: number };
    const chunked = db.prepare('SELECT SUM(count) AS n FROM episode_chunks').get() as { n: number };
    db.close();
    expect(row.status).toBe('interrupted');
    expect(row.episodes_done).toBeGreaterThanOrEqual(200);
    expect(chunked.n).toBe(row.episodes_done);
    expect(stderr).toContain(`after ${row.episodes_done.toLocaleString('en-US')} of ${Number(episodes).toLocaleString('en-US')} episodes`);
  });

  it('a live run cannot be deleted: refused with its process id, and the run goes on untouched', async () => {
    const store = storeIn(tempFiles({}));
    const child = spawn(process.execPath, [CLI, 'estimate', ...slow, '--episodes', episodes, '--seed', '13', '--store', store], {
      env: { ...process.env, RECKON_NO_PROGRESS: '1' },
    });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    await waitForEpisodes(store, 100, 30000);
    const id = json(reckon(['runs', 'list', '--store', store, '--json']))[0].id;
    const refused = reckon(['runs', 'delete', id, '--store', store]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain(`run ${id}: is still running (process ${child.pid})`);
    child.kill('SIGINT');
    expect(await new Promise((r) => child.on('exit', r))).toBe(130);
    expect(stderr).not.toContain('internal error');
    expect(json(reckon(['runs', 'show', id, '--store', store, '--json'])).status).toBe('interrupted');
    expect(reckon(['runs', 'delete', id, '--store', store]).code).toBe(0);
  });
});

describe('resume checks every file the run was defined by', () => {
  it('an edit to the environment file, to the module it names, or to a base policy is refused, naming that file', async () => {
    const code = readFileSync(path.join(slowDir, 'slow.js'), 'utf8');
    const dir = tempFiles({
      'env.json': { kind: 'module', path: './slow.js', options: {} },
      'slow.js': code,
      'base.json': { kind: 'uniform' },
      'noisy.json': { kind: 'epsilon', epsilon: 0.1, base: { path: 'base.json' } },
    });
    const store = storeIn(dir);
    const child = spawn(process.execPath, [CLI, 'estimate', '--env', path.join(dir, 'env.json'), '--policy', path.join(dir, 'noisy.json'), '--episodes', '8000', '--seed', '4', '--store', store], {
      env: { ...process.env, RECKON_NO_PROGRESS: '1' },
      stdio: 'ignore',
    });
    await waitForEpisodes(store, 100, 30000);
    child.kill('SIGINT');
    expect(await new Promise((r) => child.on('exit', r))).toBe(130);
    const id = json(reckon(['runs', 'list', '--store', store, '--json']))[0].id;
    const edits: [string, string][] = [
      ['env.json', JSON.stringify({ kind: 'module', path: './slow.js', options: { unused: 1 } })],
      ['slow.js', code.replace('0.05', '0.06')],
      ['base.json', JSON.stringify({ kind: 'uniform', description: 'the same policy, reworded' })],
    ];
    for (const [file, edited] of edits) {
      const original = readFileSync(path.join(dir, file), 'utf8');
      writeFileSync(path.join(dir, file), edited);
      const refused = reckon(['runs', 'resume', id, '--store', store], { cwd: dir });
      expect(refused.code).toBe(2);
      expect(refused.stderr).toContain(`run ${id}: ${file} (part of its ${file === 'base.json' || file === 'noisy.json' ? 'policy' : 'environment'}) has changed since the run started`);
      writeFileSync(path.join(dir, file), original);
    }
    expect(json(reckon(['runs', 'resume', id, '--store', store, '--json'], { cwd: dir })).episodes).toBe(8000);
  }, 180_000);
});

describe('shards', () => {
  it('shards 1/3, 2/3 and 3/3 in three stores merge to the unsharded run', () => {
    const dir = tempFiles({});
    const base = ['estimate', ...grid, '--episodes', '9001', '--seed', '21', '--json'];
    for (const k of [1, 2, 3]) json(reckon([...base, '--shard', `${k}/3`, '--store', path.join(dir, `s${k}.sqlite`)]));
    const merged = json(reckon(['runs', 'merge', ...[1, 2, 3].map((k) => path.join(dir, `s${k}.sqlite`)), '--into', path.join(dir, 'all.sqlite'), '--json']));
    const whole = json(reckon([...base, '--no-store']));
    expect(merged.episodes).toBe(9001);
    expect(merged.mean).toBe(whole.mean);
    expect(merged.std).toBe(whole.std);
    expect(merged.ci).toStrictEqual(whole.ci);
  });

  it('--shard auto/M reads the job-array index (Kubernetes JOB_COMPLETION_INDEX is 0-based)', () => {
    const store = storeIn(tempFiles({}));
    const out = json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '2', '--shard', 'auto/3', '--store', store, '--json'], { env: { JOB_COMPLETION_INDEX: '2' } }));
    const shown = json(reckon(['runs', 'show', out.run_id, '--store', store, '--json']));
    expect(shown.shard).toStrictEqual({ index: 3, count: 3, total: 300 });
    expect(out.episodes).toBe(100);
  });

  it('merging shards of different seeds is refused, naming the field', () => {
    const dir = tempFiles({});
    json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '1', '--shard', '1/2', '--store', path.join(dir, 'a.sqlite'), '--json']));
    json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '2', '--shard', '2/2', '--store', path.join(dir, 'b.sqlite'), '--json']));
    const out = reckon(['runs', 'merge', path.join(dir, 'a.sqlite'), path.join(dir, 'b.sqlite'), '--into', path.join(dir, 'c.sqlite')]);
    expect(out.code).toBe(2);
    expect(out.stderr).toContain('seed');
    expect(out.stderr).not.toContain('internal error');
    // The refused merge leaves no empty store behind.
    expect(existsSync(path.join(dir, 'c.sqlite'))).toBe(false);
  });
});

describe('damaged stores', () => {
  it('a corrupt page: runs show exits 2 naming the store and runs check; runs check lists the damage', () => {
    const store = storeIn(tempFiles({}));
    const run = json(reckon(['estimate', ...grid, '--episodes', '40000', '--seed', '1', '--workers', '1', '--store', store, '--json']));
    const healthy = reckon(['runs', 'check', '--store', store]);
    expect(healthy.code).toBe(0);
    expect(healthy.stdout).toContain('no problems found (1 runs, 40,000 episodes)');
    // Overwrite three whole pages in the middle of the file, where the episode chunks live
    // (SQLite's default page size is 4096 bytes, from its file format documentation).
    const bytes = readFileSync(store);
    const pages = Math.floor(bytes.length / 4096);
    for (let p = Math.floor(pages / 2); p < Math.floor(pages / 2) + 3; p++) bytes.fill(0xff, p * 4096, (p + 1) * 4096);
    writeFileSync(store, bytes);
    const shown = reckon(['runs', 'show', run.run_id, '--store', store]);
    expect(shown.code).toBe(2);
    expect(shown.stderr).toContain(`reckon: store ${store}: is damaged`);
    expect(shown.stderr).toContain(`reckon runs check --store ${store}`);
    expect(shown.stderr).not.toContain('internal error');
    const checked = reckon(['runs', 'check', '--store', store, '--json']);
    expect(checked.code).toBe(2);
    const report = JSON.parse(checked.stdout);
    expect(report.ok).toBe(false);
    expect(report.problems.join('\n')).toContain('SQLite');
  });

  it('runs check finds a run whose counted episodes disagree with its chunks', () => {
    const store = storeIn(tempFiles({}));
    const run = json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '1', '--store', store, '--json']));
    const db = new Database(store);
    db.prepare('UPDATE runs SET episodes_done = episodes_done + 5 WHERE id = ?').run(run.run_id);
    db.close();
    const checked = reckon(['runs', 'check', '--store', store]);
    expect(checked.code).toBe(2);
    expect(checked.stdout).toContain(`run ${run.run_id}: counts 305 episodes but its chunks hold 300`);
  });
});

describe('opening stores', () => {
  function sha(file: string): string {
    return createHash('sha256').update(readFileSync(file)).digest('hex');
  }

  it('a store of schema version 1, made by this test, is migrated forward and its runs still show', () => {
    const store = storeIn(tempFiles({}));
    const db = new Database(store);
    db.exec('CREATE TABLE reckon_schema (version INTEGER NOT NULL); INSERT INTO reckon_schema VALUES (1);');
    db.exec(MIGRATIONS[0]);
    const returns = new Float64Array([1, 2, 3, 4]);
    const lengths = new Uint32Array([5, 6, 7, 8]);
    db.prepare(`INSERT INTO runs (id, kind, status, created_at, env_label, env_json, env_hash, env_base_dir, policy_label, policy_json,
      policy_hash, policy_base_dir, seed, start_state, first_episode, episodes_requested, options_json, facts_json, tool_version,
      machine_json, episodes_done, steps, seconds) VALUES ('oldrun22', 'estimate', 'done', '2026-01-01T00:00:00.000Z', 'e.json', '{}', 'ab', '/',
      'p.json', '{}', 'cd', '/', 5, NULL, 0, 4, ?, ?, '0.0.1', '{}', 4, 26, 1)`).run(
      JSON.stringify({ episodes: 4, method: 't', level: 0.95, bounds: null, targetError: null, workers: 1 }),
      JSON.stringify({ kind: 'finite', discount: 1, horizon: 10, horizonDerived: false, actions: ['a'], states: 2, rewardRange: [0, 1], returnBounds: null, truncationBound: null }),
    );
    db.prepare('INSERT INTO episode_chunks VALUES (?, 0, 4, ?, ?)').run('oldrun22', Buffer.from(returns.buffer), Buffer.from(lengths.buffer));
    db.close();
    const shown = json(reckon(['runs', 'show', 'oldrun22', '--store', store, '--json']));
    expect(shown.mean).toBe(2.5);
    // Sample std of 1, 2, 3, 4 = √(5/3) (common practice).
    expect(shown.std).toBeCloseTo(Math.sqrt(5 / 3), 14);
    const after = new Database(store, { readonly: true });
    expect((after.prepare('SELECT version FROM reckon_schema').get() as { version: number }).version).toBe(MIGRATIONS.length);
    after.close();
  });

  it('a file that is not a database, a foreign SQLite file, and a newer store are refused (exit 2) and left untouched', () => {
    const dir = tempFiles({ 'notes.txt': 'shopping list: tape, labels\n'.repeat(100) });
    const foreign = path.join(dir, 'other.sqlite');
    const f = new Database(foreign);
    f.exec('CREATE TABLE recipes (name TEXT)');
    f.close();
    const newer = path.join(dir, 'newer.sqlite');
    const n = new Database(newer);
    n.exec('CREATE TABLE reckon_schema (version INTEGER NOT NULL); INSERT INTO reckon_schema VALUES (99);');
    n.close();
    for (const [file, text] of [
      [path.join(dir, 'notes.txt'), 'not a reckon store'],
      [foreign, 'not a reckon store'],
      [newer, 'newer reckon'],
    ] as const) {
      const before = sha(file);
      const out = reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--store', file]);
      expect(out.code).toBe(2);
      expect(out.stderr).toContain(text);
      expect(out.stderr).toContain(file);
      expect(reckon(['runs', 'list', '--store', file]).code).toBe(2);
      expect(sha(file)).toBe(before);
    }
  });
});

describe('two writers', () => {
  it('two estimate runs writing one store at once both succeed', async () => {
    const store = storeIn(tempFiles({}));
    const start = (seed: string) =>
      new Promise<string>((resolve) => {
        const child = spawn(process.execPath, [CLI, 'estimate', ...slow, '--episodes', '4000', '--seed', seed, '--workers', '1', '--store', store], {
          env: { ...process.env, RECKON_NO_PROGRESS: '1', RECKON_DEBUG: '1' },
          stdio: ['ignore', 'ignore', 'pipe'],
        });
        let stderr = '';
        child.stderr.on('data', (d) => (stderr += d));
        // The exit code with what the run said, so a failure here shows its reason.
        child.on('close', (code) => resolve(`exit ${code}${code === 0 ? '' : `: ${stderr}`}`));
      });
    const outcomes = await Promise.all([start('1'), start('2')]);
    expect(outcomes).toStrictEqual(['exit 0', 'exit 0']);
    const runs = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(runs).toHaveLength(2);
    expect(runs.every((r: { status: string; episodes: number }) => r.status === 'done' && r.episodes === 4000)).toBe(true);
  });
});
