import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * `plan --group`: the pilot's variance split, the allocation n* and the seeds it takes. The
 * formulas are checked against outside values in test/stats/groups.test.ts; here the command
 * line's wiring: the printed n* follows from the printed costs and variances, and bad options
 * are refused with one line.
 */
const C = path.join(FIXTURES, 'textbook-samples');
const env = path.join(C, 'grid-4x3-slip.json');
const base = path.join(C, 'grid-4x3-policy.json');
const eps = (e: number) => ({ kind: 'epsilon', epsilon: e, base: { path: base } });

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('plan --group', () => {
  const dir = tempFiles({ 'g.json': { kind: 'group', policies: [eps(0.05), eps(0.2), eps(0.35), eps(0.5)] } });
  const group = `method=${path.join(dir, 'g.json')}`;

  it('gives n* = √((c_seed/c_episode)·σ²_w/σ²_b) from its own measurements, and the seeds for a half-width and for a difference', () => {
    const plan = json(reckon(['plan', '--env', env, '--group', group, '--seed-cost', '2m', '--target-error', '0.05', '--difference', '0.1', '--pilot', '300', '--seed', '3', '--workers', '1', '--json']));
    expect(plan.seed_cost_seconds).toBe(120);
    const g = plan.groups[0];
    expect(g.members).toBe(4);
    expect(g.pilot_episodes).toBe(300);
    expect(g.between_seeds).toBeGreaterThan(0);
    expect(g.episodes_per_member_source).toBe('allocation');
    expect(g.episodes_per_member).toBe(Math.max(2, Math.round(Math.sqrt((120 / g.episode_seconds) * (g.within_policy / g.between_seeds)))));
    expect(g.seeds_for_target_error).toBeGreaterThanOrEqual(2);
    expect(plan.effect_size).toBeCloseTo(0.1 / Math.sqrt(g.between_seeds + g.within_policy / g.episodes_per_member), 12);
    expect(plan.seeds_per_group_for_difference).toBeGreaterThanOrEqual(2);
    expect(plan.power_at_seeds).toBeGreaterThanOrEqual(0.8);
  });

  it('without --seed-cost plans at --episodes a member, in text', () => {
    const text = reckon(['plan', '--env', env, '--group', group, '--episodes', '500', '--target-error', '0.05', '--pilot', '200', '--seed', '3', '--workers', '1']);
    expect(text.code).toBe(0);
    expect(text.stdout).toContain('At 500 episodes a member');
    expect(text.stdout).toMatch(/method\s+4\s/);
  });

  it('refuses bad options with one line (exit 2)', () => {
    const cases: [string[], RegExp][] = [
      [['--group', group, '--seed-cost', 'soon', '--target-error', '0.1'], /^reckon: --seed-cost: must be a duration such as 90s, 30m, 2h or 1\.5d/],
      [['--group', group], /^reckon: --target-error: with --group give --target-error E/],
      [['--policy', base, '--seed-cost', '2h', '--target-error', '0.1'], /^reckon: --seed-cost: plans a training method/],
      [['--group', group, '--policy', base, '--target-error', '0.1'], /^reckon: --policy: plan with --group or with --policy, not both/],
    ];
    for (const [extra, message] of cases) {
      const r = reckon(['plan', '--env', env, ...extra, '--pilot', '100']);
      expect(r.code, extra.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr, extra.join(' ')).toMatch(message);
    }
  });
});
