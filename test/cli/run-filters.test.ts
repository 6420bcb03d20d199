import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { buildApp } from '../../src/server/app.js';
import { ENVS, FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * Every filter of `runs list` (and of `GET /api/runs`) on a store of a few runs whose start
 * times are set to a month's spread. The reference is which runs were made with what (common
 * practice: a filter lists exactly the runs that satisfy it).
 */
const C = path.join(FIXTURES, 'textbook-samples');
const OP = path.join(FIXTURES, 'off-policy');
const policy = path.join(C, 'grid-4x3-policy.json');
const uniform = path.join(ENVS, 'textbook', 'uniform.json');

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('runs list filters', () => {
  const dir = tempFiles({});
  const store = path.join(dir, 'runs.sqlite');
  const env = path.join(dir, 'grid.json');
  copyFileSync(path.join(C, 'grid-4x3-slip.json'), env);
  const s = ['--store', store];
  const estimate = (p: string, seed: number, ...extra: string[]) => json(reckon(['estimate', '--env', env, '--policy', p, '--episodes', '200', '--seed', String(seed), ...s, '--json', ...extra])).run_id as string;
  const early = estimate(policy, 1, '--label', 'reported=yes', '--note', 'the baseline of the dock study');
  const middle = estimate(uniform, 2, '--label', 'owner=ana');
  const comparison = json(reckon(['compare', '--env', env, '--policy', policy, '--policy', uniform, '--episodes', '200', '--seed', '3', ...s, '--json', '--label', 'reported=no'])).run_id as string;
  const offpolicy = json(reckon(['offpolicy', '--log', path.join(OP, 'three-episodes.jsonl'), '--policy', path.join(OP, 'two-state-target.json'), '--resamples', '200', ...s, '--json'])).run_id as string;
  // The environment file is then edited: later runs use its new version.
  const grid = JSON.parse(readFileSync(env, 'utf8'));
  writeFileSync(env, JSON.stringify({ ...grid, discount: 0.9 }, null, 2));
  const edited = estimate(policy, 4);
  const dead = estimate(uniform, 5);
  const db = new Database(store);
  const at = db.prepare('UPDATE runs SET created_at = ? WHERE id = ? OR parent_id = ?');
  at.run('2026-10-01T09:00:00.000Z', early, early);
  at.run('2026-10-20T09:00:00.000Z', middle, middle);
  at.run('2026-11-02T09:00:00.000Z', comparison, comparison);
  at.run('2026-11-10T09:00:00.000Z', offpolicy, offpolicy);
  at.run('2026-11-20T09:00:00.000Z', edited, edited);
  at.run('2026-11-25T09:00:00.000Z', dead, dead);
  // A run recorded as running whose process is gone reads as interrupted.
  db.prepare("UPDATE runs SET status = 'running', owner_pid = 2147483646, owner_host = ?, finished_at = NULL WHERE id = ?").run(hostname(), dead);
  db.close();
  const ids = (...filters: string[]) => json(reckon(['runs', 'list', ...filters, ...s, '--json'])).map((r: { id: string }) => r.id);

  it('no filter lists every top-level run newest first', () => {
    expect(ids()).toEqual([dead, edited, offpolicy, comparison, middle, early]);
  });

  it('--label KEY=VALUE, KEY alone, and several (all must match)', () => {
    expect(ids('--label', 'reported=yes')).toEqual([early]);
    expect(ids('--label', 'reported')).toEqual([comparison, early]);
    expect(ids('--label', 'reported=yes', '--label', 'owner=ana')).toEqual([]);
    expect(ids('--label', 'owner=ana')).toEqual([middle]);
  });

  it('--since and --until (dates include the --until day; times are UTC)', () => {
    expect(ids('--since', '2026-11-01')).toEqual([dead, edited, offpolicy, comparison]);
    expect(ids('--until', '2026-10-20')).toEqual([middle, early]);
    expect(ids('--since', '2026-10-20T09:00', '--until', '2026-11-02T08:59')).toEqual([middle]);
    // a span back from now: every run here is older than a day, by the times set above
    expect(ids('--since', '1d')).toEqual([]);
  });

  it('--status (as runs read: a dead process is interrupted) and --kind', () => {
    expect(ids('--status', 'interrupted')).toEqual([dead]);
    expect(ids('--status', 'running')).toEqual([]);
    expect(ids('--status', 'done', '--kind', 'estimate')).toEqual([edited, middle, early]);
    expect(ids('--kind', 'comparison,offpolicy')).toEqual([offpolicy, comparison]);
  });

  it('--policy and --text (notes, names and file paths)', () => {
    // a comparison's policy name holds every policy it compared
    expect(ids('--policy', 'uniform')).toEqual([dead, comparison, middle]);
    expect(ids('--text', 'DOCK STUDY')).toEqual([early]);
    expect(ids('--text', 'three-episodes')).toEqual([offpolicy]);
  });

  it('--env FILE lists the runs of the file as it is now and names those of its older version', () => {
    const result = reckon(['runs', 'list', '--env', env, ...s, '--json']);
    expect(json(result).map((r: { id: string }) => r.id)).toEqual([dead, edited]);
    expect(result.stderr).toMatch(new RegExp(`^reckon: 3 stored runs used an older version of ${env.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} \\(hash [0-9a-f]{12}: 3 runs, last 2026-11-02\\); list them with --env-hash [0-9a-f]{12}\\n$`));
    const oldHash = /--env-hash ([0-9a-f]{12})/.exec(result.stderr)![1];
    expect(ids('--env-hash', oldHash)).toEqual([comparison, middle, early]);
    const text = reckon(['runs', 'list', '--env', env, ...s]).stdout;
    expect(text).toContain('3 stored runs used an older version of');
  });

  it('--all with filters lists member runs as runs of their own; a filter that matches nothing says so', () => {
    expect(ids('--all', '--kind', 'estimate', '--since', '2026-11-02', '--until', '2026-11-02')).toHaveLength(2);
    expect(reckon(['runs', 'list', '--label', 'nobody=here', ...s]).stdout).toBe('No stored runs match these filters.\n');
  });

  it('bad filters: one line naming the option, exit 2', () => {
    const cases: [string[], string][] = [
      [['--since', 'last tuesday'], 'reckon: --since: must be a date (2026-11-02), a date and time (2026-11-02T14:30, UTC) or a span back from now (36h, 7d, 2w) (got "last tuesday")\n'],
      [['--until', '2026-02-30'], 'reckon: --until: must be a date (2026-11-02), a date and time (2026-11-02T14:30, UTC) or a span back from now (36h, 7d, 2w) (got "2026-02-30")\n'],
      [['--status', 'finished'], 'reckon: --status: must be a run status: running, done, interrupted, failed (several with commas) (got "finished")\n'],
      [['--kind', 'estimate,plot'], 'reckon: --kind: must be a run kind: estimate, comparison, offpolicy (several with commas) (got "estimate,plot")\n'],
      [['--since', '2026-11-02', '--until', '2026-11-01'], 'reckon: --until: is not after --since (2026-11-02T00:00:00.000Z … 2026-11-02T00:00:00.000Z): nothing could match\n'],
      [['--env', path.join(dir, 'missing.json')], `reckon: ${path.join(dir, 'missing.json')}: no such file\n`],
    ];
    for (const [args, message] of cases) {
      const result = reckon(['runs', 'list', ...args, ...s]);
      expect(result.code, args.join(' ')).toBe(2);
      expect(result.stderr, args.join(' ')).toBe(message);
    }
  });

  it('GET /api/runs takes the same filters', async () => {
    const app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    try {
      const get = async (query: string) => (await app.inject({ url: `/api/runs?${query}` })).json().map((r: { id: string }) => r.id);
      expect(await get('label=reported%3Dyes')).toEqual([early]);
      expect(await get('since=2026-11-01&kind=estimate')).toEqual([dead, edited]);
      expect(await get('status=interrupted')).toEqual([dead]);
      expect(await get('text=dock&policy=&until=')).toEqual([early]);
      const bad = await app.inject({ url: '/api/runs?since=soon' });
      expect(bad.statusCode).toBe(400);
      expect(bad.json().error).toMatch(/^\?since: must be a date/);
    } finally {
      await app.close();
    }
  });
}, 120_000);
