import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { ENVS, reckon, tempFiles } from './run-cli.js';

/** Code environments and policies through the command line. */
describe('module environments', () => {
  const env = path.join(ENVS, 'restock-env.json');
  const policy = path.join(ENVS, 'restock-base-stock.json');

  it('estimates with bounds from the declared reward range and is reproducible across workers', () => {
    const args = ['estimate', '--env', env, '--policy', policy, '--episodes', '3000', '--seed', '9', '--ci', 'hoeffding', '--json'];
    const one = JSON.parse(reckon([...args, '--workers', '1']).stdout);
    const two = JSON.parse(reckon([...args, '--workers', '2']).stdout);
    expect(two.mean).toBe(one.mean);
    expect(two.ci).toStrictEqual(one.ci);
    expect(one.return_bounds.source).toBe('environment');
    expect(one.ci.method).toBe('hoeffding');
  });

  it('a plug-in that throws is reported with its episode and step, exit code 1', () => {
    const dir = tempFiles({
      'env.json': { kind: 'module', path: './bad.js', options: {} },
      'uniform.json': { kind: 'uniform' },
      'bad.js': `export default () => ({
        actions: ['a', 'b'], discount: 0.9, horizon: 20,
        reset: () => 0,
        step(state, action, rng, out) {
          if (state === 3) throw new Error('the forklift battery is flat');
          out.state = state + 1; out.reward = 1; out.done = false; return out;
        },
      });`,
    });
    const out = reckon(['estimate', '--env', 'env.json', '--policy', 'uniform.json', '--episodes', '10', '--seed', '1', '--workers', '1'], { cwd: dir });
    expect(out.code).toBe(1);
    expect(out.stderr).toContain('the forklift battery is flat');
    expect(out.stderr).toMatch(/episode 0, step 3/);
  });

  it('hoeffding without any known bounds says to give --bounds (exit 2)', () => {
    const dir = tempFiles({
      'env.json': { kind: 'module', path: './walk.js', options: {} },
      'uniform.json': { kind: 'uniform' },
      'walk.js': `export default () => ({
        actions: ['left', 'right'], discount: 0.9, horizon: 30,
        reset: () => 0,
        step(state, action, rng, out) { out.state = state + (action ? 1 : -1); out.reward = rng.uniform(); out.done = false; return out; },
      });`,
    });
    const out = reckon(['estimate', '--env', 'env.json', '--policy', 'uniform.json', '--episodes', '100', '--ci', 'hoeffding'], { cwd: dir });
    expect(out.code).toBe(2);
    expect(out.stderr).toContain('--bounds');
    const given = reckon(['estimate', '--env', 'env.json', '--policy', 'uniform.json', '--episodes', '100', '--ci', 'hoeffding', '--bounds', '0,10', '--json'], { cwd: dir });
    expect(given.code).toBe(0);
    expect(JSON.parse(given.stdout).return_bounds.source).toBe('user');
  });
});
