/**
 * Labels and notes on stored runs: given when a run starts (`--label`, `--note`), added later
 * (`runs label`, `runs note`), and given back by `runs show`, `runs list`, the API and every
 * run JSON; and a store at the schema before them (6) migrates with its runs intact. The
 * reference is what was given (common practice: a store gives back what it was given).
 */
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { MIGRATIONS } from '../../src/store/migrations.js';
import { ENVS, FIXTURES, reckon, tempFiles } from '../cli/run-cli.js';

const C = path.join(FIXTURES, 'textbook-samples');
const grid = ['--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json')];
const uniform = path.join(ENVS, 'textbook', 'uniform.json');

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('labels and notes', () => {
  it('a store at schema 6 migrates: its runs and episodes are intact, and they take labels', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const before = json(reckon(['estimate', ...grid, '--episodes', '500', '--seed', '4', '--store', store, '--json']));
    // Back to the store the previous reckon left: schema 6, without the tables of labels and notes.
    const old = new Database(store);
    old.exec('UPDATE reckon_schema SET version = 6; DROP TABLE run_labels; DROP TABLE run_notes;');
    const chunks = old.prepare('SELECT COUNT(*) AS n, SUM(count) AS episodes FROM episode_chunks').get();
    expect(old.prepare("SELECT COUNT(*) AS n FROM sqlite_master WHERE name IN ('run_labels', 'run_notes')").get()).toStrictEqual({ n: 0 });
    old.close();
    expect(MIGRATIONS.length).toBeGreaterThan(6);

    const labelled = json(reckon(['runs', 'label', before.run_id, 'reported=yes', '--store', store, '--json']));
    expect(labelled.labels).toStrictEqual({ reported: 'yes' });
    const after = new Database(store, { readonly: true });
    expect((after.prepare('SELECT version FROM reckon_schema').get() as { version: number }).version).toBe(MIGRATIONS.length);
    expect(after.prepare('SELECT COUNT(*) AS n, SUM(count) AS episodes FROM episode_chunks').get()).toStrictEqual(chunks);
    after.close();
    const shown = json(reckon(['runs', 'show', before.run_id, '--store', store, '--json']));
    expect(shown.mean).toBe(before.mean);
    expect(shown.labels).toStrictEqual({ reported: 'yes' });
    expect(shown.notes).toStrictEqual([]);
  });

  it('round trip: --label and --note at the start, runs label and runs note later, in show, list, the API and the page data', async () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const run = json(reckon(['estimate', ...grid, '--episodes', '300', '--seed', '1', '--label', 'quarter=q4', '--label', 'owner=ana', '--note', 'baseline for the dock study', '--store', store, '--json']));
    expect(run.labels).toStrictEqual({ quarter: 'q4', owner: 'ana' });
    expect(run.notes.map((n: { text: string }) => n.text)).toStrictEqual(['baseline for the dock study']);
    const id = run.run_id as string;
    // a key set again takes the new value; a key can be removed
    const relabelled = reckon(['runs', 'label', id, 'owner=bo', 'release=v2.1', '--remove', 'quarter', '--store', store]);
    expect(relabelled.stdout).toBe(`Run ${id} labels: owner=bo, release=v2.1\n`);
    json(reckon(['runs', 'note', id, 'reported', 'in', 'the', 'review', '--store', store, '--json']));
    const shown = json(reckon(['runs', 'show', id, '--store', store, '--json']));
    expect(shown.labels).toStrictEqual({ owner: 'bo', release: 'v2.1' });
    expect(shown.notes.map((n: { text: string }) => n.text)).toStrictEqual(['baseline for the dock study', 'reported in the review']);
    expect(shown.notes[0].added_at <= shown.notes[1].added_at).toBe(true);
    const text = reckon(['runs', 'show', id, '--store', store]).stdout;
    expect(text).toContain('labels: owner=bo, release=v2.1');
    expect(text).toContain('reported in the review');
    const listed = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(listed[0].labels).toStrictEqual({ owner: 'bo', release: 'v2.1' });
    expect(reckon(['runs', 'list', '--store', store]).stdout).toMatch(new RegExp(`${id} .* done +owner=bo, release=v2\\.1\n`));

    const compared = json(reckon(['compare', ...grid.slice(0, 2), '--policy', grid[3], '--policy', uniform, '--episodes', '200', '--seed', '2', '--label', 'study=docks', '--note', 'first pass', '--store', store, '--json']));
    expect(compared.labels).toStrictEqual({ study: 'docks' });
    const showCompared = json(reckon(['runs', 'show', compared.run_id, '--store', store, '--json']));
    expect(showCompared.labels).toStrictEqual({ study: 'docks' });
    expect(showCompared.notes[0].text).toBe('first pass');

    const OP = path.join(FIXTURES, 'off-policy');
    const offpolicy = json(reckon(['offpolicy', '--log', path.join(OP, 'three-episodes.jsonl'), '--policy', path.join(OP, 'two-state-target.json'), '--resamples', '200', '--label', 'log=week48', '--store', store, '--json']));
    expect(offpolicy.labels).toStrictEqual({ log: 'week48' });
    expect(json(reckon(['runs', 'show', offpolicy.run_id, '--store', store, '--json'])).labels).toStrictEqual({ log: 'week48' });

    const app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    try {
      expect((await app.inject({ url: `/api/offpolicy/${offpolicy.run_id}` })).json().labels).toStrictEqual({ log: 'week48' });
      const apiRun = (await app.inject({ url: `/api/runs/${id}` })).json();
      expect(apiRun.labels).toStrictEqual(shown.labels);
      expect(apiRun.notes).toStrictEqual(shown.notes);
      const apiComparison = (await app.inject({ url: `/api/comparisons/${compared.run_id}` })).json();
      expect(apiComparison.labels).toStrictEqual({ study: 'docks' });
      // The page adds labels and notes over the API, checked by the same rules.
      const post = (url: string, body: unknown, type = 'application/json') => app.inject({ method: 'POST', url, headers: { 'content-type': type }, payload: JSON.stringify(body) });
      const labelled = await post(`/api/runs/${compared.run_id}/labels`, { labels: { checked: 'yes' }, remove: ['study'] });
      expect(labelled.statusCode).toBe(200);
      expect(labelled.json().labels).toStrictEqual({ checked: 'yes' });
      const noted = await post(`/api/runs/${compared.run_id}/notes`, { text: 'second look' });
      expect(noted.statusCode).toBe(201);
      expect(noted.json().notes.map((n: { text: string }) => n.text)).toEqual(['first pass', 'second look']);
      const bad = await post(`/api/runs/${compared.run_id}/labels`, { labels: { 'a b': 'x' } });
      expect(bad.statusCode).toBe(400);
      expect(bad.json().error).toMatch(/^labels\.a b: a label key is 1 to 64/);
      expect((await post(`/api/runs/${compared.run_id}/notes`, { text: ' ' })).json().error).toBe('text: a note needs some text');
      expect((await post(`/api/runs/${compared.run_id}/notes`, { text: 'x' }, 'text/plain')).statusCode).toBe(415);
      expect((await post('/api/runs/zzzzzzzz/notes', { text: 'x' })).statusCode).toBe(404);
      const rows = (await app.inject({ url: '/api/runs' })).json();
      expect(rows.find((r: { id: string }) => r.id === id).labels).toStrictEqual(shown.labels);
    } finally {
      await app.close();
    }
  }, 60_000);

  it('bad labels and notes are refused with one line naming the place, exit 2, and nothing is stored', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const bad = reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--label', 'no-equals-sign', '--store', store]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toBe('reckon: --label: must be KEY=VALUE, e.g. --label reported=yes (got "no-equals-sign")\n');
    const badKey = reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--label', 'a key=1', '--store', store]);
    expect(badKey.code).toBe(2);
    expect(badKey.stderr).toMatch(/^reckon: --label: a label key is 1 to 64 letters.*\(got "a key=1"\)\n$/);
    const empty = reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--note', '  ', '--store', store]);
    expect(empty.code).toBe(2);
    expect(empty.stderr).toBe('reckon: --note: a note needs some text\n');
    const unstored = reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--label', 'a=1', '--no-store']);
    expect(unstored.code).toBe(2);
    expect(unstored.stderr).toContain('--label: labels and notes are kept with the stored run');
    const run = json(reckon(['estimate', ...grid, '--episodes', '100', '--seed', '1', '--store', store, '--json']));
    const unknown = reckon(['runs', 'label', 'zzzzzzzz', 'a=1', '--store', store]);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/^reckon: run zzzzzzzz: no such run/);
    const noValue = reckon(['runs', 'label', run.run_id, 'a=', '--store', store]);
    expect(noValue.code).toBe(2);
    expect(noValue.stderr).toBe('reckon: runs label: a label needs a value after "=", e.g. reported=yes (got "a=")\n');
    expect(json(reckon(['runs', 'show', run.run_id, '--store', store, '--json'])).labels).toStrictEqual({});
    expect(json(reckon(['runs', 'list', '--store', store, '--json']))).toHaveLength(1);
  }, 60_000);
});
