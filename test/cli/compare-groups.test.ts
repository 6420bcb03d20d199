import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * `compare --group` from the command line: groups given as comma lists and as group files,
 * the two-level report in text and JSON, kept in the store and shown again, and bad groups
 * refused with one line that names the place. The statistics themselves are checked against
 * outside values in test/stats/groups.test.ts and test/statistical/group-coverage.test.ts.
 */
const C = path.join(FIXTURES, 'textbook-samples');
const env = path.join(C, 'grid-4x3-slip.json');
const base = path.join(C, 'grid-4x3-policy.json');
const eps = (e: number) => ({ kind: 'epsilon', epsilon: e, base: { path: base } });

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('compare --group', () => {
  const dir = tempFiles({
    'a1.json': eps(0.05),
    'a2.json': eps(0.1),
    'a3.json': eps(0.15),
    'b-group.json': { kind: 'group', description: 'three seeds', policies: [eps(0.3), eps(0.4), { path: 'a1.json' }] },
    'one.json': { kind: 'group', policies: [eps(0.3)] },
    'bad-member.json': { kind: 'group', policies: [eps(0.3), { kind: 'epsilon', epsilon: 2, base: { path: base } }] },
  });
  const store = path.join(dir, 'runs.sqlite');
  const at = (f: string) => path.join(dir, f);
  const args = ['compare', '--env', env, '--group', `low=${at('a1.json')},${at('a2.json')},${at('a3.json')}`, '--group', `high=${at('b-group.json')}`, '--episodes', '400', '--seed', '5'];
  const result = json(reckon([...args, '--store', store, '--json']));

  it('reports each group over its members and the difference between groups', () => {
    expect(result.policies).toHaveLength(6);
    expect(result.groups.map((g: { name: string }) => g.name)).toEqual(['low', 'high']);
    expect(result.groups[0].members).toEqual([0, 1, 2]);
    expect(result.groups[1].members).toEqual([3, 4, 5]);
    const means = result.policies.map((p: { mean: number }) => p.mean);
    expect(result.groups[0].mean).toBeCloseTo((means[0] + means[1] + means[2]) / 3, 12);
    expect(result.groups[1].member_means).toEqual([means[3], means[4], means[5]]);
    const g = result.groups[0];
    expect(g.ci.low).toBeLessThan(g.mean);
    expect(g.ci.high).toBeGreaterThan(g.mean);
    expect(g.ci.method).toBe('seed-t');
    expect(g.uncertainty.episode_share).toBeGreaterThanOrEqual(0);
    expect(g.uncertainty.episode_share).toBeLessThanOrEqual(1);
    expect(['more-seeds', 'more-episodes', 'both']).toContain(g.advice);
    expect(result.group_differences).toHaveLength(1);
    expect(result.group_differences[0].mean).toBeCloseTo(result.groups[0].mean - result.groups[1].mean, 12);
    expect(result.group_differences[0].method).toBe('welch');
    // Lower ε on this grid is better; the member a1.json is the same policy in both groups.
    expect(result.policies[5].mean).toBe(result.policies[0].mean);
    expect(result.policies[5].name).toBe(path.join(dir, 'a1.json'));
    expect(result.policies[3].name).toBe(`${at('b-group.json')}#policies[0]`);
  });

  it('a member has the figures it has alone with the same seed (common random numbers)', () => {
    const alone = json(reckon(['estimate', '--env', env, '--policy', at('a2.json'), '--episodes', '400', '--seed', '5', '--no-store', '--json']));
    expect(result.policies[1].mean).toBe(alone.mean);
  });

  it('prints the two-level report in text', () => {
    const text = reckon([...args, '--no-store']);
    expect(text.code).toBe(0);
    expect(text.stdout).toContain('Group low: 3 members');
    expect(text.stdout).toContain('t interval over seeds');
    expect(text.stdout).toMatch(/uncertainty from\s+seeds \d+%/);
    expect(text.stdout).toContain('Between groups');
    expect(text.stdout).toContain('P(a low member is worth more than a high member)');
  });

  it('is stored: runs show gives the same groups again', () => {
    const shown = json(reckon(['runs', 'show', result.run_id, '--store', store, '--json']));
    expect(shown.groups).toEqual(result.groups);
    expect(shown.group_differences).toEqual(result.group_differences);
    expect(reckon(['runs', 'show', result.run_id, '--store', store]).stdout).toContain('Group high: 3 members');
  });

  it('refuses bad groups with one line naming the place (exit 2)', () => {
    const cases: [string[], RegExp][] = [
      [['--group', 'nofiles'], /^reckon: --group: expected NAME=FILE\[,FILE…\]/],
      [['--group', `solo=${at('a1.json')}`], /^reckon: --group solo: needs at least 2 policies/],
      [['--group', `g=${at('one.json')}`], /one\.json: policies must have at least 2 entries/],
      [['--group', `g=${at('bad-member.json')}`], /bad-member\.json: policies\[1\]\.epsilon must be between 0 and 1 \(got 2\)/],
      [['--group', `g=${at('a1.json')},${at('a2.json')}`, '--group', `g=${at('a2.json')},${at('a3.json')}`], /--group: the name "g" is given twice/],
      [['--group', `g=${at('a1.json')},${at('missing.json')}`], /missing\.json: no such file/],
    ];
    for (const [extra, message] of cases) {
      const r = reckon(['compare', '--env', env, ...extra, '--episodes', '50', '--no-store']);
      expect(r.code, extra.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr, extra.join(' ')).toMatch(message);
    }
  });
});
