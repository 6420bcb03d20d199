import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { ENVS, FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * A comparison's member runs from the command line. The reference for the paired returns is
 * an estimate of each policy alone with the same seed: common random numbers mean episode i
 * of policy p is the same whether p runs alone or in a comparison (README, "Comparing policies").
 */
const C = path.join(FIXTURES, 'textbook-samples');
const env = path.join(C, 'grid-4x3-slip.json');
const policies = [path.join(C, 'grid-4x3-policy.json'), path.join(ENVS, 'textbook', 'uniform.json')];

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('comparison members', () => {
  const dir = tempFiles({});
  const store = path.join(dir, 'runs.sqlite');
  const compared = json(reckon(['compare', '--env', env, '--policy', policies[0], '--policy', policies[1], '--episodes', '300', '--seed', '3', '--store', store, '--json']));
  const id = compared.run_id as string;

  it('runs show --json lists the member run ids, one a policy', () => {
    const shown = json(reckon(['runs', 'show', id, '--store', store, '--json']));
    expect(shown.kind).toBe('comparison');
    expect(shown.members).toHaveLength(2);
    expect(shown.policies.map((p: { run_id: string }) => p.run_id)).toEqual(shown.members);
    for (const [p, member] of (shown.members as string[]).entries()) {
      const run = json(reckon(['runs', 'show', member, '--store', store, '--json']));
      expect(run.policy).toBe(policies[p]);
      expect(run.mean).toBe(shown.policies[p].mean);
    }
    expect(reckon(['runs', 'show', id, '--store', store]).stdout).toContain(`member runs, one a policy: [0] ${shown.members[0]}, [1] ${shown.members[1]}`);
  });

  it('runs list shows the members under their comparison, and with --all as runs of their own', () => {
    const top = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(top).toHaveLength(1);
    expect(top[0].id).toBe(id);
    expect(top[0].members).toHaveLength(2);
    const all = json(reckon(['runs', 'list', '--store', store, '--all', '--json']));
    expect(all).toHaveLength(3);
    for (const member of top[0].members) expect(all.find((r: { id: string }) => r.id === member).parent_id).toBe(id);
    const text = reckon(['runs', 'list', '--store', store]).stdout;
    for (const member of top[0].members) expect(text).toContain(`└ ${member}`);
  });

  it('runs export of a comparison writes the paired returns, one column a policy, equal to each policy run alone', () => {
    const csv = reckon(['runs', 'export', id, '--store', store, '--format', 'csv']).stdout.trim().split('\n');
    expect(csv[0]).toBe(`episode,${policies[0]},${policies[1]}`);
    expect(csv).toHaveLength(301);
    const columns = [1, 2].map((c) => csv.slice(1).map((line) => Number(line.split(',')[c])));
    expect(csv.slice(1).map((line) => Number(line.split(',')[0]))).toEqual(Array.from({ length: 300 }, (_, i) => i));
    const alone = path.join(dir, 'alone.sqlite');
    for (const [p, policy] of policies.entries()) {
      const run = json(reckon(['estimate', '--env', env, '--policy', policy, '--episodes', '300', '--seed', '3', '--store', alone, '--json']));
      const exported = json(reckon(['runs', 'export', run.run_id, '--store', alone, '--format', 'json']));
      expect(columns[p]).toEqual(exported.returns);
    }
    const asJson = json(reckon(['runs', 'export', id, '--store', store, '--format', 'json']));
    expect(asJson.returns[0]).toEqual(columns[0]);
    expect(asJson.policies).toEqual(policies);
  }, 120_000);

  it('runs plot of a comparison names its member runs', () => {
    const shown = json(reckon(['runs', 'show', id, '--store', store, '--json']));
    const out = reckon(['runs', 'plot', id, '--store', store, '--out', path.join(dir, 'x.svg')]);
    expect(out.code).toBe(2);
    expect(out.stderr).toContain(`${shown.members[0]}, ${shown.members[1]}`);
  });
});
