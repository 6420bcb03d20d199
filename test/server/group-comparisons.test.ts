import { describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { reckon } from '../cli/run-cli.js';
import { readJson, tempStore, waitForRun } from './helpers.js';

/** Groups of policies over HTTP: the group file's schema, inline only, stored, plotted. */
const grid = readJson('textbook/grid-4x3.json');
const optimal = readJson('textbook/grid-4x3-optimal.json');
const eps = (epsilon: number) => ({ kind: 'epsilon', epsilon, base: optimal });

describe('comparisons of groups over HTTP', () => {
  it('runs a posted group comparison; GET and runs show --json agree; the groups plot has a row per member and one per group', async () => {
    const storePath = tempStore();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    try {
      const payload = {
        env: grid,
        env_name: 'grid-4x3.json',
        groups: [
          { name: 'low', definition: { kind: 'group', policies: [eps(0.05), eps(0.1), eps(0.15)] } },
          { name: 'high', definition: { kind: 'group', policies: [eps(0.3), eps(0.4)] } },
        ],
        episodes: 500,
        seed: 4,
      };
      const posted = await app.inject({ method: 'POST', url: '/api/comparisons', payload });
      expect(posted.statusCode).toBe(202);
      const { id } = posted.json();
      const done = (await waitForRun(async () => (await app.inject({ url: `/api/comparisons/${id}` })).json())) as Record<string, any>;
      expect(done.status).toBe('done');
      expect(done.groups.map((g: { name: string; members: number[] }) => [g.name, g.members])).toEqual([['low', [0, 1, 2]], ['high', [3, 4]]]);
      expect(done.policies[3].name).toBe('high member 1');
      const cli = JSON.parse(reckon(['runs', 'show', id, '--json', '--store', storePath]).stdout);
      expect(cli.groups).toEqual(done.groups);
      expect(cli.group_differences).toEqual(done.group_differences);
      const plot = (await app.inject({ url: `/api/comparisons/${id}/groups-plot` })).json();
      const rows = plot.data.values as { kind: string; mean: number; low: number; high: number }[];
      expect(rows.filter((r) => r.kind === 'member')).toHaveLength(5);
      const groupRows = rows.filter((r) => r.kind === 'group');
      expect(groupRows.map((r) => [r.mean, r.low, r.high])).toEqual(done.groups.map((g: any) => [g.mean, g.ci.low, g.ci.high]));
      // The differences plot of a group comparison draws the difference of group means, one bar, not the 10 member pairs.
      const differences = (await app.inject({ url: `/api/comparisons/${id}/plot` })).json().data.values as { pair: string; mean: number; low: number; high: number }[];
      expect(differences).toHaveLength(1);
      expect(differences[0].pair).toBe('low − high');
      expect([differences[0].mean, differences[0].low, differences[0].high]).toEqual([done.group_differences[0].mean, done.group_differences[0].low, done.group_differences[0].high]);
    } finally {
      await app.close();
    }
  });

  it('refuses file paths in a group, groups of one, twice the same name, and too few policies, naming the field', async () => {
    const app = await buildApp({ storePath: tempStore(), toolVersion: 'test', workers: 1 });
    try {
      const post = (payload: object) => app.inject({ method: 'POST', url: '/api/comparisons', payload });
      const path = await post({ env: grid, groups: [{ name: 'g', definition: { kind: 'group', policies: [eps(0.1), 'seed-2.json'] } }] });
      expect(path.statusCode).toBe(400);
      expect(path.json().field).toBe('groups[0].definition.policies[1]');
      expect(path.json().error).toMatch(/accepts no file paths/);
      const one = await post({ env: grid, policies: [{ definition: optimal }], groups: [{ name: 'g', definition: { kind: 'group', policies: [eps(0.1)] } }] });
      expect(one.statusCode).toBe(400);
      expect(one.json().error).toMatch(/^request: groups\[0\]\.definition\.policies must have at least 2/);
      const twice = await post({ env: grid, groups: [0, 1].map(() => ({ name: 'g', definition: { kind: 'group', policies: [eps(0.1), eps(0.2)] } })) });
      expect(twice.statusCode).toBe(400);
      expect(twice.json().error).toMatch(/"g" is given twice/);
      const none = await post({ env: grid, policies: [{ definition: optimal }] });
      expect(none.statusCode).toBe(400);
      expect(none.json().error).toMatch(/^request: policies .*at least two/);
    } finally {
      await app.close();
    }
  });
});
