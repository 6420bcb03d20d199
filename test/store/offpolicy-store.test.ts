/**
 * Off-policy runs in the store: written by `reckon offpolicy`, listed and shown by `runs`,
 * served to the page; and a store at the schema before them (4) migrates with every stored run
 * intact. Figures are compared with what the command printed when it ran (common practice:
 * the store must give back what it was given).
 */
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { MIGRATIONS } from '../../src/store/migrations.js';
import { FIXTURES, reckon, tempFiles } from '../cli/run-cli.js';

const OP = path.join(FIXTURES, 'off-policy');
const C = path.join(FIXTURES, 'textbook-samples');
const grid = ['--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json')];
const offpolicy = ['offpolicy', '--log', path.join(OP, 'three-episodes.jsonl'), '--policy', path.join(OP, 'two-state-target.json'), '--resamples', '200'];

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('off-policy runs in the store', () => {
  it('a store at schema 4 migrates: its runs and episodes are intact, and an off-policy run joins them', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    // the store as the previous reckon left it: schema 4, with one estimate run
    const db = new Database(store);
    db.exec('CREATE TABLE reckon_schema (version INTEGER NOT NULL); INSERT INTO reckon_schema VALUES (4);');
    for (let v = 0; v < 4; v++) db.exec(MIGRATIONS[v]);
    db.close();
    const before = json(reckon(['estimate', ...grid, '--episodes', '800', '--seed', '2', '--store', store, '--json']));
    const old = new Database(store);
    // back to schema 4: without what migrations 5 (off-policy logs), 6 (final states) and 7 (labels and notes) added
    old.exec('UPDATE reckon_schema SET version = 4; DROP TABLE IF EXISTS offpolicy_logs; ALTER TABLE episode_chunks DROP COLUMN finals; DROP TABLE IF EXISTS run_labels; DROP TABLE IF EXISTS run_notes;');
    const chunks = old.prepare('SELECT COUNT(*) AS n, SUM(count) AS episodes FROM episode_chunks').get();
    old.close();

    const run = json(reckon([...offpolicy, '--store', store, '--json']));
    expect(run.run_id).toMatch(/^[a-z2-9]{8}$/);
    const after = new Database(store, { readonly: true });
    expect((after.prepare('SELECT version FROM reckon_schema').get() as { version: number }).version).toBe(MIGRATIONS.length);
    expect(after.prepare('SELECT COUNT(*) AS n, SUM(count) AS episodes FROM episode_chunks').get()).toStrictEqual(chunks);
    after.close();
    const shownOld = json(reckon(['runs', 'show', before.run_id, '--store', store, '--json']));
    expect(shownOld.mean).toBe(before.mean);
    expect(shownOld.episodes).toBe(800);

    const shown = json(reckon(['runs', 'show', run.run_id, '--store', store, '--json']));
    expect(shown.kind).toBe('offpolicy');
    expect(shown.estimates).toStrictEqual(run.estimates);
    expect(shown.log.sha256).toBe(run.log.sha256);
    expect(shown.log.bytes).toBe(run.log.bytes);
    const text = reckon(['runs', 'show', run.run_id, '--store', store]);
    expect(text.stdout).toContain('(off-policy, done)');
    expect(text.stdout).toContain('effective sample size (Kish)');

    const rows = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(rows.map((r: { kind: string }) => r.kind).sort()).toStrictEqual(['estimate', 'offpolicy']);
    const listed = reckon(['runs', 'list', '--store', store]);
    expect(listed.stdout).toMatch(/wdr 0\.\d+ ± \d/);

    const svg = path.join(tempFiles({}), 'weights.svg');
    const plotted = reckon(['runs', 'plot', run.run_id, '--store', store, '--out', svg]);
    expect(plotted.code).toBe(0);
    expect(plotted.stdout).toContain('weight histogram');

    const exported = reckon(['runs', 'export', run.run_id, '--store', store]);
    expect(exported.code).toBe(2);
    expect(exported.stderr).toMatch(/is an off-policy run of .*three-episodes\.jsonl: it ran no episodes to export/);
  });

  it('the review server serves an off-policy run, its weight histogram, and points the estimate route to it', async () => {
    const storePath = path.join(tempFiles({}), 'runs.sqlite');
    const run = json(reckon([...offpolicy, '--store', storePath, '--json']));
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    try {
      const got = await app.inject({ method: 'GET', url: `/api/offpolicy/${run.run_id}` });
      expect(got.statusCode).toBe(200);
      const body = got.json();
      expect(body.diagnostics.ess).toBeCloseTo(1.251257, 6);
      expect(body.estimates.map((e: { name: string }) => e.name)).toStrictEqual(['is', 'wis', 'pdis', 'cwpdis', 'dr', 'wdr']);
      const plot = (await app.inject({ method: 'GET', url: `/api/offpolicy/${run.run_id}/plot` })).json();
      const bins = plot.data.values as { count: number }[];
      expect(bins.reduce((a, b) => a + b.count, 0)).toBe(3);
      const list = (await app.inject({ method: 'GET', url: '/api/runs' })).json();
      expect(list[0].kind).toBe('offpolicy');
      const wrong = await app.inject({ method: 'GET', url: `/api/runs/${run.run_id}` });
      expect(wrong.statusCode).toBe(400);
      expect(wrong.json().error).toContain(`/api/offpolicy/${run.run_id}`);
      const page = await app.inject({ method: 'GET', url: '/app.js' });
      expect(page.body).toContain('renderOffPolicy');
    } finally {
      await app.close();
    }
  });
});
