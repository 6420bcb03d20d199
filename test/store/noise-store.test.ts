import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { MIGRATIONS } from '../../src/store/migrations.js';
import { ENVS, FIXTURES, reckon, tempFiles } from '../cli/run-cli.js';
import { readJson, waitForRun } from '../server/helpers.js';

/**
 * The noise mode travels with a run: stored, shown by `runs show`, `runs list --json` and the
 * HTTP API, used again by resume and merge, and read as "step" from stores written before the
 * mode was recorded. The references are runs of the same spec that never touched the store.
 */
const C = path.join(FIXTURES, 'textbook-samples');
const grid = ['--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json')];

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('the noise mode in the store', () => {
  it('runs show and runs list --json report the mode each run used', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const visit = json(reckon(['estimate', ...grid, '--episodes', '3000', '--seed', '4', '--noise', 'visit', '--store', store, '--json']));
    const step = json(reckon(['estimate', ...grid, '--episodes', '3000', '--seed', '4', '--store', store, '--json']));
    expect(visit.noise).toBe('visit');
    expect(step.noise).toBe('step');
    const shown = json(reckon(['runs', 'show', visit.run_id, '--store', store, '--json']));
    expect(shown.noise).toBe('visit');
    expect(shown.mean).toBe(visit.mean);
    const rows = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(Object.fromEntries(rows.map((r: { id: string; noise: string }) => [r.id, r.noise]))).toStrictEqual({ [visit.run_id]: 'visit', [step.run_id]: 'step' });
    const exported = json(reckon(['runs', 'export', visit.run_id, '--store', store, '--format', 'json']));
    expect(exported.noise).toBe('visit');
    const text = reckon(['runs', 'show', visit.run_id, '--store', store]);
    expect(text.stdout).toContain('keyed by state visit (--noise visit)');
  });

  it('compare --noise visit is stored as such, and each policy has the figures of estimate --noise visit', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const env = path.join(ENVS, 'warehouse.json');
    const policies = ['picker-direct.json', 'picker-direct-eps.json'].map((p) => path.join(ENVS, p));
    const compared = json(reckon(['compare', '--env', env, '--policy', policies[0], '--policy', policies[1], '--episodes', '4000', '--seed', '3', '--noise', 'visit', '--store', store, '--json']));
    expect(compared.noise).toBe('visit');
    policies.forEach((policy, p) => {
      const alone = json(reckon(['estimate', '--env', env, '--policy', policy, '--episodes', '4000', '--seed', '3', '--noise', 'visit', '--no-store', '--json']));
      expect(compared.policies[p].mean).toBe(alone.mean);
      expect(compared.policies[p].std).toBe(alone.std);
      expect([compared.policies[p].ci.low, compared.policies[p].ci.high]).toStrictEqual([alone.ci.low, alone.ci.high]);
    });
    const shown = json(reckon(['runs', 'show', compared.run_id, '--store', store, '--json']));
    expect(shown.noise).toBe('visit');
    expect(shown.differences[0].mean).toBe(compared.differences[0].mean);
    const text = reckon(['compare', '--env', env, '--policy', policies[0], '--policy', policies[1], '--episodes', '500', '--seed', '3', '--noise', 'visit', '--no-store']);
    expect(text.stdout).toContain('keyed by state visit (--noise visit)');
  });

  it('shards of a visit-noise run merge to the unsharded visit-noise run; shards of different modes are refused', () => {
    const dir = tempFiles({});
    const base = ['estimate', ...grid, '--episodes', '6001', '--seed', '21', '--noise', 'visit', '--json'];
    for (const k of [1, 2, 3]) json(reckon([...base, '--shard', `${k}/3`, '--store', path.join(dir, `s${k}.sqlite`)]));
    const merged = json(reckon(['runs', 'merge', ...[1, 2, 3].map((k) => path.join(dir, `s${k}.sqlite`)), '--into', path.join(dir, 'all.sqlite'), '--json']));
    const whole = json(reckon([...base, '--no-store']));
    expect(merged.noise).toBe('visit');
    expect(merged.episodes).toBe(6001);
    expect(merged.mean).toBe(whole.mean);
    expect(merged.std).toBe(whole.std);
    expect(merged.ci).toStrictEqual(whole.ci);

    json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '1', '--shard', '1/2', '--noise', 'visit', '--store', path.join(dir, 'a.sqlite'), '--json']));
    json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '1', '--shard', '2/2', '--noise', 'step', '--store', path.join(dir, 'b.sqlite'), '--json']));
    const refused = reckon(['runs', 'merge', path.join(dir, 'a.sqlite'), path.join(dir, 'b.sqlite'), '--into', path.join(dir, 'c.sqlite')]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('noise mode');
  });

  it('a store at the schema before the mode was recorded migrates, and its runs read as step-keyed', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const before = 4 - 1; // the schema just before the noise column (migration 4)
    const db = new Database(store);
    db.exec(`CREATE TABLE reckon_schema (version INTEGER NOT NULL); INSERT INTO reckon_schema VALUES (${before});`);
    for (let v = 0; v < before; v++) db.exec(MIGRATIONS[v]);
    expect(db.prepare("SELECT COUNT(*) AS n FROM pragma_table_info('runs') WHERE name = 'noise'").get()).toStrictEqual({ n: 0 });
    db.close();
    // A run as the previous schema stored it (no noise column).
    const old = new Database(store);
    old.prepare(`INSERT INTO runs (id, kind, status, created_at, env_label, env_json, env_hash, env_base_dir, policy_label, policy_json,
      policy_hash, policy_base_dir, seed, start_state, first_episode, episodes_requested, options_json, facts_json, tool_version,
      machine_json, episodes_done, steps, seconds) VALUES ('oldrun33', 'estimate', 'done', '2026-01-01T00:00:00.000Z', 'e.json', '{}', 'ab', '/',
      'p.json', '{}', 'cd', '/', 6, NULL, 0, 2, ?, ?, '0.0.1', '{}', 2, 2, 1)`).run(
      JSON.stringify({ episodes: 2, method: 't', level: 0.95, bounds: null, targetError: null, workers: 1 }),
      JSON.stringify({ kind: 'finite', discount: 1, horizon: 10, horizonDerived: false, actions: ['a'], states: 2, rewardRange: [0, 1], returnBounds: null, truncationBound: null }),
    );
    old.prepare('INSERT INTO episode_chunks VALUES (?, 0, 2, ?, ?)').run('oldrun33', Buffer.from(new Float64Array([1, 3]).buffer), Buffer.from(new Uint32Array([1, 1]).buffer));
    old.close();
    const shown = json(reckon(['runs', 'show', 'oldrun33', '--store', store, '--json']));
    expect(shown.noise).toBe('step');
    expect(shown.mean).toBe(2);
    const after = new Database(store, { readonly: true });
    expect((after.prepare('SELECT version FROM reckon_schema').get() as { version: number }).version).toBe(MIGRATIONS.length);
    after.close();
    const fresh = json(reckon(['estimate', ...grid, '--episodes', '500', '--seed', '6', '--noise', 'visit', '--store', store, '--json']));
    expect(json(reckon(['runs', 'show', fresh.run_id, '--store', store, '--json'])).noise).toBe('visit');
  });

  it('plan --noise visit pilots in that mode: the demo\'s close pair gets a smaller σ of the difference, as scripts/bench-noise.mjs measures', () => {
    const base = ['plan', '--env', path.join(ENVS, 'warehouse.json'), '--policy', path.join(ENVS, 'picker-direct.json'), '--policy', path.join(ENVS, 'picker-direct-eps.json'), '--difference', '0.05', '--pilot', '5000', '--seed', '2', '--workers', '1', '--json'];
    const visit = json(reckon([...base, '--noise', 'visit']));
    const step = json(reckon(base));
    expect([visit.noise, step.noise]).toStrictEqual(['visit', 'step']);
    expect(visit.sigma_difference).toBeLessThan(0.95 * step.sigma_difference);
    expect(visit.episodes_needed).toBeLessThan(step.episodes_needed);
  });

  it('a module environment with --noise visit: exit 2, one line naming the option; a bad mode too', () => {
    const out = reckon(['estimate', '--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(ENVS, 'restock-base-stock.json'), '--noise', 'visit', '--no-store']);
    expect(out.code).toBe(2);
    expect(out.stderr).toMatch(/^reckon: --noise: visit needs a finite environment \(gridworld or tabular\), and .*restock-env\.json is a module environment; use --noise step\n$/);
    const bad = reckon(['estimate', ...grid, '--noise', 'turbulent', '--no-store']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toBe('reckon: --noise: must be one of step, visit (how draws are keyed: by step, or by state visit) (got "turbulent")\n');
  });
});

describe('the noise mode over HTTP', () => {
  it('POST /api/evaluations and /api/comparisons take noise, checked as --noise is; the run keeps it', async () => {
    const storePath = path.join(tempFiles({}), 'runs.sqlite');
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    try {
      const env = readJson('textbook/grid-4x3.json');
      const policy = readJson('textbook/grid-4x3-optimal.json');
      const bad = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env, policy, noise: 'turbulent' } });
      expect(bad.statusCode).toBe(400);
      const cli = reckon(['estimate', ...grid, '--noise', 'turbulent', '--no-store']);
      expect(`reckon: ${bad.json().error}\n`).toBe(cli.stderr);
      const started = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env, policy, episodes: 3000, seed: 8, noise: 'visit' } });
      expect(started.statusCode).toBe(202);
      const done = (await waitForRun(async () => (await app.inject({ url: `/api/runs/${started.json().id}` })).json())) as Record<string, unknown>;
      expect(done.noise).toBe('visit');
      const direct = json(reckon(['estimate', '--env', path.join(ENVS, 'textbook/grid-4x3.json'), '--policy', path.join(ENVS, 'textbook/grid-4x3-optimal.json'), '--episodes', '3000', '--seed', '8', '--noise', 'visit', '--no-store', '--json']));
      expect(done.mean).toBe(direct.mean);
      const rows = (await app.inject({ url: '/api/runs' })).json();
      expect(rows[0].noise).toBe('visit');

      const uniform = readJson('textbook/uniform.json');
      const payload = { env, policies: [{ name: 'optimal', definition: policy }, { name: 'uniform', definition: uniform }], episodes: 3000, seed: 8, noise: 'visit' };
      const posted = await app.inject({ method: 'POST', url: '/api/comparisons', payload });
      expect(posted.statusCode).toBe(202);
      const compared = (await waitForRun(async () => (await app.inject({ url: `/api/comparisons/${posted.json().id}` })).json())) as Record<string, any>;
      expect(compared.noise).toBe('visit');
      // The optimal policy's figures are those of the visit-noise estimate above.
      expect(compared.policies[0].mean).toBe(direct.mean);
    } finally {
      await app.close();
    }
  });
});
