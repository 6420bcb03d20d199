import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { buildApp } from '../../src/server/app.js';
import { ENVS, FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * A stored run's provenance (its files checked against the disk, the command that reproduces
 * it) and the store's housekeeping (delete by filters, --dry-run, vacuum, long exports). The
 * reproducing command is checked by running it: the same seed gives the same figures, bit for
 * bit (README, "Runs are reproducible").
 */
const C = path.join(FIXTURES, 'textbook-samples');
const policy = path.join(C, 'grid-4x3-policy.json');
const uniform = path.join(ENVS, 'textbook', 'uniform.json');
const version = JSON.parse(readFileSync(path.join(__dirname, '../../package.json'), 'utf8')).version;

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

/** The reproducing command's words after `reckon` (its paths hold no spaces here). */
function words(command: string): string[] {
  const [first, ...rest] = command.split(' ');
  expect(first).toBe('reckon');
  return rest;
}

describe('provenance', () => {
  const dir = tempFiles({});
  const store = path.join(dir, 'runs.sqlite');
  const env = path.join(dir, 'grid.json');
  copyFileSync(path.join(C, 'grid-4x3-slip.json'), env);
  const s = ['--store', store];

  it('runs show names the files with their hashes, says whether each still matches, and gives a command that reproduces the run', async () => {
    const run = json(reckon(['estimate', '--env', env, '--policy', policy, '--episodes', '300', '--seed', '5', '--ci', 'bootstrap', ...s, '--json']));
    const shown = json(reckon(['runs', 'show', run.run_id, ...s, '--json']));
    expect(shown.files.map((f: { role: string; path: string; on_disk: string }) => [f.role, f.path, f.on_disk])).toEqual([
      ['environment', env, 'unchanged'],
      ['policy', policy, 'unchanged'],
    ]);
    expect(shown.files[0].sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(shown.tool_version).toBe(version);
    expect(shown.machine.cores).toBeGreaterThan(0);
    expect(shown.reproduce_command).toBe(`reckon estimate --env ${env} --policy ${path.relative(process.cwd(), policy)} --seed 5 --episodes 300 --ci bootstrap`);
    const again = json(reckon([...words(shown.reproduce_command), '--no-store', '--json']));
    expect(again.mean).toBe(run.mean);
    expect(again.ci).toStrictEqual(run.ci);

    const app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    try {
      const api = (await app.inject({ url: `/api/runs/${run.run_id}` })).json();
      expect(api.reproduce_command).toBe(shown.reproduce_command);
      expect(api.files).toStrictEqual(shown.files);
    } finally {
      await app.close();
    }

    writeFileSync(env, readFileSync(env, 'utf8').replace('"step_reward": -0.04', '"step_reward": -0.05'));
    const after = json(reckon(['runs', 'show', run.run_id, ...s, '--json']));
    expect(after.files[0].on_disk).toBe('changed');
    expect(reckon(['runs', 'show', run.run_id, ...s]).stdout).toMatch(/grid\.json \(environment\) [0-9a-f]{12}: CHANGED since/);
    copyFileSync(path.join(C, 'grid-4x3-slip.json'), env);
  }, 60_000);

  it('a comparison and a target-error run reproduce too', () => {
    const compared = json(reckon(['compare', '--env', env, '--policy', policy, '--policy', uniform, '--episodes', '300', '--seed', '6', '--iqm', ...s, '--json']));
    const shown = json(reckon(['runs', 'show', compared.run_id, ...s, '--json']));
    expect(shown.reproduce_command).toMatch(/^reckon compare --env \S+ --policy \S+ --policy \S+ --seed 6 --episodes 300 --iqm$/);
    const again = json(reckon([...words(shown.reproduce_command), '--no-store', '--json']));
    expect(again.differences).toStrictEqual(compared.differences);
    const target = json(reckon(['estimate', '--env', env, '--policy', policy, '--target-error', '0.1', '--seed', '7', ...s, '--json']));
    const command = json(reckon(['runs', 'show', target.run_id, ...s, '--json'])).reproduce_command;
    expect(command).toMatch(/ --seed 7 --target-error 0\.1 --max-episodes 10000000 --ci betting$/);
    const repeated = json(reckon([...words(command), '--no-store', '--json']));
    expect([repeated.episodes, repeated.mean]).toEqual([target.episodes, target.mean]);
  }, 60_000);
});

describe('housekeeping', () => {
  const dir = tempFiles({});
  const store = path.join(dir, 'runs.sqlite');
  const s = ['--store', store];
  const env = ['--env', path.join(C, 'grid-4x3-slip.json')];
  const estimate = (seed: number, ...extra: string[]) => json(reckon(['estimate', ...env, '--policy', policy, '--episodes', '2000', '--seed', String(seed), ...s, '--json', ...extra])).run_id as string;
  const drafts = [estimate(1, '--label', 'draft=yes'), estimate(2, '--label', 'draft=yes')];
  const kept = estimate(3, '--label', 'reported=yes');
  const live = estimate(4, '--label', 'draft=yes');
  const comparison = json(reckon(['compare', ...env, '--policy', policy, '--policy', uniform, '--episodes', '200', '--seed', '5', ...s, '--json']));
  // A run whose process (this one) is alive reads as running: it must survive every delete.
  const db = new Database(store);
  db.prepare("UPDATE runs SET status = 'running', owner_pid = ?, owner_host = ?, heartbeat_at = ? WHERE id = ?").run(process.pid, hostname(), new Date().toISOString(), live);
  db.close();
  const ids = () => json(reckon(['runs', 'list', ...s, '--json'])).map((r: { id: string }) => r.id).sort();

  it('runs export of several ids writes one long CSV (run_id, labels, episode, return, length) that equals each run alone', () => {
    const csv = reckon(['runs', 'export', drafts[0], kept, ...s]).stdout.trim().split('\n');
    expect(csv[0]).toBe('run_id,labels,episode,return,length');
    expect(csv).toHaveLength(1 + 4000);
    for (const id of [drafts[0], kept]) {
      const alone = reckon(['runs', 'export', id, ...s]).stdout.trim().split('\n').slice(1);
      const rows = csv.slice(1).filter((line) => line.startsWith(`${id},`));
      expect(rows.map((line) => line.split(',').slice(2).join(','))).toEqual(alone);
    }
    expect(csv[1]).toBe(`${drafts[0]},draft=yes,0,${reckon(['runs', 'export', drafts[0], ...s]).stdout.split('\n')[1].split(',').slice(1).join(',')}`);
    const long = json(reckon(['runs', 'export', kept, '--long', '--format', 'json', ...s]));
    expect(long.runs[0]).toMatchObject({ run_id: kept, labels: { reported: 'yes' }, first_episode: 0 });
    expect(long.runs[0].returns).toHaveLength(2000);
  });

  it('--dry-run lists what would go and deletes nothing; without --yes and no terminal it refuses', () => {
    const before = ids();
    const dry = reckon(['runs', 'delete', '--label', 'draft=yes', '--dry-run', ...s]);
    expect(dry.code).toBe(0);
    expect(dry.stdout).toContain('Would delete 2 runs (4,000 episodes)');
    for (const id of drafts) expect(dry.stdout).toContain(id);
    expect(dry.stdout).toContain(`Kept 1 running run (${live})`);
    const dryJson = json(reckon(['runs', 'delete', '--label', 'draft=yes', '--dry-run', ...s, '--json']));
    expect([...dryJson.would_delete].sort()).toEqual([...drafts].sort());
    expect(dryJson.deleted).toEqual([]);
    expect(ids()).toEqual(before);
    const refused = reckon(['runs', 'delete', '--label', 'draft=yes', ...s]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toBe('reckon: runs delete: would delete 2 runs found by the filters; add --yes to confirm (there is no terminal to ask), and see them first with --dry-run\n');
    expect(ids()).toEqual(before);
    // A comparison's member runs go only with their comparison.
    const estimates = json(reckon(['runs', 'delete', '--all', '--kind', 'estimate', '--dry-run', ...s, '--json']));
    expect([...estimates.kept_members].sort()).toEqual([...comparison.policies.map((p: { run_id: string }) => p.run_id)].sort());
    expect([...estimates.would_delete].sort()).toEqual([...drafts, kept].sort());
    const nothing = reckon(['runs', 'delete', ...s]);
    expect(nothing.code).toBe(2);
    expect(nothing.stderr).toMatch(/^reckon: runs delete: needs run ids or filters/);
  });

  it('--yes deletes what the filters find but never a running run; vacuum gives the space back', () => {
    const size = json(reckon(['runs', 'vacuum', ...s, '--json']));
    const deleted = json(reckon(['runs', 'delete', '--label', 'draft=yes', '--yes', ...s, '--json']));
    expect([...deleted.deleted].sort()).toEqual([...drafts].sort());
    expect(deleted.kept_running).toEqual([live]);
    expect(ids()).toEqual([kept, live, comparison.run_id].sort());
    const refused = reckon(['runs', 'delete', live, ...s]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('is still running');
    const vacuumed = json(reckon(['runs', 'vacuum', ...s, '--json']));
    expect(vacuumed.bytes_after).toBeLessThan(size.bytes_after);
    expect(reckon(['runs', 'check', ...s]).code).toBe(0);
    expect(json(reckon(['runs', 'show', kept, ...s, '--json'])).episodes).toBe(2000);
  }, 60_000);
}, 180_000);
