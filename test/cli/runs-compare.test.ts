import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { buildApp } from '../../src/server/app.js';
import { holmAdjust } from '../../src/stats/holm.js';
import { summarize } from '../../src/stats/summary.js';
import { welchComparison } from '../../src/stats/welch.js';
import { ENVS, FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * `runs compare` of stored runs. Paired runs are checked against a live `compare` of the same
 * policies, seed and episodes, figure for figure (bit for bit): common random numbers make
 * episode i of a policy the same whether it ran alone or in a comparison (README, "Comparing
 * policies"). Welch's figures themselves are checked against SciPy in test/stats/welch.test.ts;
 * here the unpaired report is checked to be Welch's and Holm's of the stored returns.
 */
const C = path.join(FIXTURES, 'textbook-samples');
const env = path.join(C, 'grid-4x3-slip.json');
const policies = [path.join(C, 'grid-4x3-policy.json'), path.join(ENVS, 'textbook', 'uniform.json'), path.join(ENVS, 'textbook', 'grid-4x3-optimal.json')];

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

/** The figures of a comparison: everything but ids, timings and the keys `runs compare` adds. */
function figures(report: Record<string, unknown>) {
  const copy = structuredClone(report) as Record<string, unknown> & { policies: Record<string, unknown>[] };
  for (const key of ['run_id', 'seconds', 'sampling_seconds', 'analysis_seconds', 'workers', 'paired', 'reasons', 'runs', 'members', 'env_change', 'labels', 'notes']) delete copy[key];
  for (const p of copy.policies) delete p.run_id;
  return copy;
}

describe('runs compare', () => {
  const dir = tempFiles({});
  const store = path.join(dir, 'runs.sqlite');
  const s = ['--store', store];
  const estimate = (policy: string, seed: number, episodes: number) =>
    json(reckon(['estimate', '--env', env, '--policy', policy, '--episodes', String(episodes), '--seed', String(seed), ...s, '--json'])).run_id as string;
  const same = policies.map((p) => estimate(p, 11, 600));
  const otherSeed = estimate(policies[1], 12, 600);
  const longer = estimate(policies[2], 11, 900);

  it('paired: two runs of one seed equal a live compare of the same policies, bit for bit', () => {
    const stored = json(reckon(['runs', 'compare', same[0], same[1], ...s, '--json']));
    const live = json(reckon(['compare', '--env', env, '--policy', policies[0], '--policy', policies[1], '--episodes', '600', '--seed', '11', '--no-store', '--json']));
    expect(stored.paired).toBe(true);
    expect(stored.reasons).toEqual([]);
    expect(stored.policies.map((p: { run_id: string }) => p.run_id)).toEqual([same[0], same[1]]);
    expect(figures(stored)).toStrictEqual(figures(live));
    const text = reckon(['runs', 'compare', same[0], same[1], ...s]).stdout;
    expect(text).toContain("paired by episode, exactly as 'reckon compare' reports them");
    expect(text).toContain('Paired differences (first − second)');
  });

  it('paired: three runs (Holm) with --ci bootstrap --iqm --confidence 0.9 equal the live compare too', () => {
    const options = ['--ci', 'bootstrap', '--iqm', '--confidence', '0.9'];
    const stored = json(reckon(['runs', 'compare', ...same, ...options, ...s, '--json']));
    const live = json(reckon(['compare', '--env', env, ...policies.flatMap((p) => ['--policy', p]), '--episodes', '600', '--seed', '11', ...options, '--no-store', '--json']));
    expect(stored.p_value_adjustment).toBe('holm');
    expect(figures(stored)).toStrictEqual(figures(live));
  }, 60_000);

  it('unpaired: other seeds or episode ranges get Welch intervals, Holm-adjusted for three, and the reasons', () => {
    const two = json(reckon(['runs', 'compare', same[0], otherSeed, ...s, '--json']));
    expect(two.paired).toBe(false);
    expect(two.reasons).toEqual([`seeds differ (11 in ${same[0]}, 12 in ${otherSeed})`]);
    const returns = (id: string) => Float64Array.from(json(reckon(['runs', 'export', id, '--format', 'json', ...s])).returns as number[]);
    const expected = welchComparison(summarize(returns(same[0])), summarize(returns(otherSeed)), 0.95);
    expect(two.differences[0]).toMatchObject({ a: 0, b: 1, method: 'welch', mean: expected.meanDifference, low: expected.low, high: expected.high, p_value: expected.pValue, degrees_of_freedom: expected.degreesOfFreedom });
    expect(two.p_value_adjustment).toBe('none');

    const three = json(reckon(['runs', 'compare', same[0], otherSeed, longer, ...s, '--json']));
    expect(three.reasons).toEqual([`seeds differ (11 in ${same[0]}, 12 in ${otherSeed})`, `episode ranges differ (0–599 in ${same[0]}, 0–899 in ${longer})`]);
    expect(three.p_value_adjustment).toBe('holm');
    expect(three.differences.map((d: { adjusted_p_value: number }) => d.adjusted_p_value)).toEqual(holmAdjust(three.differences.map((d: { p_value: number }) => d.p_value)));
    expect(three.policies.map((p: { episodes: number }) => p.episodes)).toEqual([600, 600, 900]);
    const text = reckon(['runs', 'compare', same[0], otherSeed, longer, ...s]).stdout;
    expect(text).toContain('could not be paired episode by episode: seeds differ');
    expect(text).toContain('Welch intervals');
    expect(text).toContain('Holm-adjusted');
  }, 60_000);

  it('runs of another environment version are refused unless --allow-env-change, which names what differs', () => {
    const changed = path.join(dir, 'grid-v2.json');
    writeFileSync(changed, JSON.stringify({ ...JSON.parse(readFileSync(env, 'utf8')), step_reward: -0.1 }));
    const other = json(reckon(['estimate', '--env', changed, '--policy', policies[0], '--episodes', '600', '--seed', '11', ...s, '--json'])).run_id;
    const refused = reckon(['runs', 'compare', same[0], other, ...s]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(new RegExp(`^reckon: run ${other}: ran another environment \\(.*grid-v2.json, hash [0-9a-f]{12}\\) than run ${same[0]} .*; give --allow-env-change to compare them anyway \\(unpaired, with the difference named\\)\\n$`));
    const allowed = json(reckon(['runs', 'compare', same[0], other, '--allow-env-change', ...s, '--json']));
    expect(allowed.paired).toBe(false);
    expect(allowed.reasons[0]).toMatch(/^environment hashes differ/);
    expect(allowed.env_change.differences).toEqual([`${same[0]} → ${other}: step_reward: -0.04 → -0.1`]);
    expect(reckon(['runs', 'compare', same[0], other, '--allow-env-change', ...s]).stdout).toContain('step_reward: -0.04 → -0.1');
  }, 60_000);

  it('--store-result keeps it as a comparison run: runs show, runs list and the comparison page give it back', async () => {
    const made = json(reckon(['runs', 'compare', same[0], same[1], '--store-result', '--label', 'review=weekly', ...s, '--json']));
    const id = made.run_id as string;
    expect(id).toMatch(/^[a-z2-9]{8}$/);
    const shown = json(reckon(['runs', 'show', id, ...s, '--json']));
    // runs show adds the stored run's provenance to the same figures
    expect(figures(shown)).toMatchObject(figures(made));
    expect(shown.kind).toBe('comparison');
    expect(shown.labels).toStrictEqual({ review: 'weekly' });
    expect(reckon(['runs', 'show', id, ...s]).stdout).toContain('comparison of stored runs');
    const listed = json(reckon(['runs', 'list', '--kind', 'comparison', ...s, '--json']));
    expect(listed.map((r: { id: string }) => r.id)).toContain(id);
    const app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    try {
      const page = (await app.inject({ url: `/api/comparisons/${id}` })).json();
      expect(figures(page)).toMatchObject(figures(made));
      expect(page.members).toEqual([same[0], same[1]]);
      const plot = await app.inject({ url: `/api/comparisons/${id}/plot` });
      expect(plot.statusCode).toBe(200);
    } finally {
      await app.close();
    }
  }, 60_000);

  it('runs delete names a stored result that compares the runs going, in --dry-run, after deleting and in --json', () => {
    const sources = [0, 1].map(() => json(reckon(['estimate', '--env', env, '--policy', policies[0], '--episodes', '200', '--seed', '9', ...s, '--json'])).run_id as string);
    const result = json(reckon(['runs', 'compare', sources[0], sources[1], '--store-result', ...s, '--json'])).run_id as string;
    const dry = json(reckon(['runs', 'delete', sources[0], '--dry-run', ...s, '--json']));
    expect(dry.orphaned_comparisons).toStrictEqual([result]);
    const deleted = reckon(['runs', 'delete', sources[0], ...s]);
    expect(deleted.code).toBe(0);
    expect(deleted.stdout).toContain(`Stored comparison ${result} compares deleted runs and can no longer be recomputed; delete it too with 'reckon runs delete ${result}'.`);
    expect(reckon(['runs', 'show', result, ...s]).stderr).toContain('which is no longer stored');
    // Deleting the result with its last source names nothing.
    expect(json(reckon(['runs', 'delete', sources[1], result, ...s, '--json'])).orphaned_comparisons).toStrictEqual([]);
  }, 60_000);

  it('bad input: one line naming the place, exit 2', () => {
    const comparison = json(reckon(['compare', '--env', env, '--policy', policies[0], '--policy', policies[1], '--episodes', '100', '--seed', '1', ...s, '--json'])).run_id;
    const cases: [string[], RegExp][] = [
      [[same[0]], /^reckon: runs compare: needs two or more run ids \(got 1\)/],
      [[same[0], 'zzzzzzzz'], /^reckon: run zzzzzzzz: no such run in /],
      [[same[0], same[0]], new RegExp(`^reckon: run ${same[0]}: is given twice`)],
      [[same[0], comparison], new RegExp(`^reckon: run ${comparison}: is a comparison: compare its member runs`)],
      [[same[0], same[1], '--ci', 'betting'], /^reckon: --ci: must be t, bootstrap or bootstrap-percentile/],
      [[same[0], same[1], '--label', 'a=1'], /^reckon: --label: labels and notes go on a stored result: add --store-result\n$/],
    ];
    for (const [args, message] of cases) {
      const result = reckon(['runs', 'compare', ...args, ...s]);
      expect(result.code, args.join(' ')).toBe(2);
      expect(result.stderr, args.join(' ')).toMatch(message);
      expect(result.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
    }
  }, 60_000);
}, 180_000);
