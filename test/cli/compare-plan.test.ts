import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { FIXTURES, ENVS, reckon, tempFiles } from './run-cli.js';

/** `reckon compare` and `reckon plan` through the command line. */
const C = path.join(FIXTURES, 'textbook-samples');

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('compare', () => {
  const dir = tempFiles({
    'eps10.json': { kind: 'epsilon', epsilon: 0.1, base: { path: path.join(C, 'grid-4x3-policy.json') } },
    'eps30.json': { kind: 'epsilon', epsilon: 0.3, base: { path: path.join(C, 'grid-4x3-policy.json') } },
  });
  const env = ['--env', path.join(C, 'grid-4x3-slip.json')];
  const three = ['--policy', path.join(C, 'grid-4x3-policy.json'), '--policy', path.join(dir, 'eps10.json'), '--policy', path.join(dir, 'eps30.json')];

  it('--json has the contract keys; three policies get Holm-adjusted p-values and a ranking', () => {
    const out = json(reckon(['compare', ...env, ...three, '--episodes', '4000', '--seed', '5', '--json', '--store', path.join(dir, 'runs.sqlite')]));
    expect(out.policies).toHaveLength(3);
    for (const p of out.policies) {
      for (const key of ['name', 'mean', 'std', 'ci', 'episodes']) expect(p).toHaveProperty(key);
      for (const key of ['low', 'high', 'method', 'level']) expect(p.ci).toHaveProperty(key);
      expect(p.episodes).toBe(4000);
    }
    expect(out.differences).toHaveLength(3);
    for (const d of out.differences) {
      for (const key of ['a', 'b', 'mean', 'low', 'high', 'p_value', 'correlation', 'variance_reduction']) expect(d).toHaveProperty(key);
      expect(d.mean).toBeCloseTo(out.policies[d.a].mean - out.policies[d.b].mean, 12);
      expect(d.adjusted_p_value).toBeGreaterThanOrEqual(d.p_value);
    }
    expect(out.p_value_adjustment).toBe('holm');
    expect(out.ranking[0]).toBe(0); // the optimal policy of AIMA Fig. 17.2 beats its noisy versions
    // runs show on the stored comparison gives the same object
    const shown = json(reckon(['runs', 'show', out.run_id, '--store', path.join(dir, 'runs.sqlite'), '--json']));
    expect(shown.differences).toStrictEqual(out.differences);
    expect(shown.policies).toStrictEqual(out.policies);
  });

  it('--target-error stops every difference within E, with anytime-valid intervals', () => {
    const out = json(reckon(['compare', ...env, '--policy', path.join(dir, 'eps10.json'), '--policy', path.join(dir, 'eps30.json'), '--start', '2,0', '--target-error', '0.5', '--seed', '3', '--json', '--no-store']));
    expect(out.target_reached).toBe(true);
    for (const d of out.differences) {
      expect((d.high - d.low) / 2).toBeLessThanOrEqual(0.5);
      expect(d.anytime_valid).toBe(true);
    }
  });

  it('two identical policies: the difference is exactly 0, said in words, never "Infinity×"', () => {
    const same = ['--policy', path.join(C, 'grid-4x3-policy.json'), '--policy', path.join(C, 'grid-4x3-policy.json')];
    const out = reckon(['compare', ...env, ...same, '--episodes', '300', '--seed', '1', '--no-store']);
    expect(out.code).toBe(0);
    expect(out.stdout).toContain('returned exactly the same in every episode');
    expect(out.stdout).not.toContain('Infinity');
  });

  it('one policy is refused with a hint', () => {
    const out = reckon(['compare', ...env, '--policy', path.join(C, 'uniform.json')]);
    expect(out.code).toBe(2);
    expect(out.stderr).toContain('--policy');
  });
});

describe('plan', () => {
  it("the t projection is within 15% of (z·σ/E)² with σ the exact return std (docs/methods.md §5)", () => {
    const env = path.join(C, 'grid-4x3-slip.json');
    const policy = path.join(C, 'grid-4x3-policy.json');
    const exact = json(reckon(['exact', '--env', env, '--policy', policy, '--start', '2,0', '--json']));
    const plan = json(reckon(['plan', '--env', env, '--policy', policy, '--start', '2,0', '--target-error', '0.01', '--pilot', '5000', '--seed', '1', '--json']));
    const expected = (1.959964 * exact.std / 0.01) ** 2; // z(0.975): NIST/SEMATECH 1.3.6.7.2 prints 1.960; six decimals from scripts/methods/fixed_n_intervals.py
    expect(Math.abs(plan.episodes_needed - expected) / expected).toBeLessThan(0.15);
    expect(plan.episodes_needed_sequential).toBeGreaterThan(plan.episodes_needed);
    expect(plan.episodes_needed_hoeffding).toBeGreaterThan(0);
    expect(plan.seconds.fixed).toBeGreaterThan(0);
  });

  it('plans a paired comparison from the pilot', () => {
    const out = json(reckon([
      'plan', '--env', path.join(ENVS, 'warehouse.json'), '--policy', path.join(ENVS, 'picker-direct.json'),
      '--policy', path.join(ENVS, 'picker-direct-eps.json'), '--difference', '0.1', '--pilot', '3000', '--seed', '2', '--json',
    ]));
    expect(out.episodes_needed).toBeGreaterThan(10);
    expect(out.power_at_episodes_needed).toBeGreaterThanOrEqual(0.8);
    expect(out.episodes_needed_unpaired).toBeGreaterThan(out.episodes_needed);
  });
});
