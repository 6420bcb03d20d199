import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
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

  it('a reward outside the declared rewardBounds, or of the wrong type, is a PluginError naming the episode and step', () => {
    const module = (reward: string) => `export default () => ({
        actions: ['a'], discount: 0.9, horizon: 10, rewardBounds: [0, 1],
        reset: () => 0,
        step(state, action, rng, out) { out.state = state + 1; out.reward = state === 2 ? ${reward} : 0.5; out.done = false; return out; },
      });`;
    const dir = tempFiles({
      'over.json': { kind: 'module', path: './over.js', options: {} },
      'text.json': { kind: 'module', path: './text.js', options: {} },
      'uniform.json': { kind: 'uniform' },
      'over.js': module('5'),
      'text.js': module('"1"'),
    });
    for (const ci of ['t', 'hoeffding']) {
      const over = reckon(['estimate', '--env', 'over.json', '--policy', 'uniform.json', '--episodes', '10', '--seed', '1', '--ci', ci, '--no-store'], { cwd: dir });
      expect(over.code).toBe(1);
      expect(over.stderr).toContain('the environment (step) returned a bad reward at episode 0, step 2: 5 is outside the rewardBounds [0, 1] it declares');
      expect(over.stderr).not.toContain('--bounds');
    }
    const text = reckon(['estimate', '--env', 'text.json', '--policy', 'uniform.json', '--episodes', '10', '--seed', '1', '--no-store'], { cwd: dir });
    expect(text.code).toBe(1);
    expect(text.stderr).toContain('returned a bad reward at episode 0, step 2: "1" (a string) is not a finite number');
  });

  it('a module policy on a module environment may answer by index or by name; anything else names the episode and step', () => {
    // Reward 1 for "go", 0 for "stay", discount 1/2, four steps: always going returns
    // 1 + 1/2 + 1/4 + 1/8 = 1.875 (a geometric sum, worked by hand).
    const dir = tempFiles({
      'env.json': { kind: 'module', path: './lane.js', options: {} },
      'lane.js': `export default () => ({
        actions: ['stay', 'go'], discount: 0.5, horizon: 4,
        reset: () => 0,
        step(state, action, rng, out) { out.state = state + 1; out.reward = action; out.done = false; return out; },
      });`,
      'by-name.json': { kind: 'module', path: './by-name.js', options: {} },
      'by-name.js': `export default () => ({ act: () => 'go' });`,
      'by-index.json': { kind: 'module', path: './by-index.js', options: {} },
      'by-index.js': `export default () => ({ act: (state, rng) => (rng.uniform() < 2 ? 1 : 0) });`,
      'off.json': { kind: 'module', path: './off.js', options: {} },
      'off.js': `export default () => ({ act: (state) => (state === 1 ? 2 : 1) });`,
    });
    for (const policy of ['by-name.json', 'by-index.json']) {
      for (const workers of ['1', '2']) {
        const out = reckon(['estimate', '--env', 'env.json', '--policy', policy, '--episodes', '200', '--seed', '3', '--workers', workers, '--no-store', '--json'], { cwd: dir });
        expect(out.code).toBe(0);
        expect(JSON.parse(out.stdout).mean).toBe(1.875);
      }
    }
    const off = reckon(['estimate', '--env', 'env.json', '--policy', 'off.json', '--episodes', '10', '--seed', '1', '--no-store'], { cwd: dir });
    expect(off.code).toBe(1);
    expect(off.stderr).toMatch(/episode 0, step 1/);
    expect(off.stderr).toContain('act returned 2, which is not an action (an index below 2 or one of stay, go)');
  });

  it('an estimate builds a module environment once a worker: its first worker reports the facts', () => {
    // Each build of the environment calls its factory, which appends a line to calls.txt.
    const dir = tempFiles({
      'env.json': { kind: 'module', path: './counted.js', options: {} },
      'uniform.json': { kind: 'uniform' },
      'counted.js': `import { appendFileSync } from 'node:fs';
      export default () => {
        appendFileSync(new URL('./calls.txt', import.meta.url), 'built\\n');
        return {
          actions: ['a', 'b'], discount: 0.9, horizon: 8, rewardBounds: [0, 1],
          reset: () => 0,
          step(state, action, rng, out) { out.state = state + 1; out.reward = rng.uniform(); out.done = false; return out; },
        };
      };`,
    });
    for (const workers of [1, 2]) {
      writeFileSync(path.join(dir, 'calls.txt'), '');
      const out = reckon(['estimate', '--env', 'env.json', '--policy', 'uniform.json', '--episodes', '4000', '--seed', '2', '--workers', String(workers), '--no-store', '--json'], { cwd: dir });
      expect(out.code).toBe(0);
      const result = JSON.parse(out.stdout);
      expect(result.return_bounds.source).toBe('environment'); // the facts arrived from the worker
      expect(result.horizon).toBe(8);
      const builds = readFileSync(path.join(dir, 'calls.txt'), 'utf8').trim().split('\n').length;
      // Never a build beyond one a worker (no thread of its own for the facts). A second worker
      // that is still starting when the first has run every episode is ended before it builds
      // the module, so with two workers one build is possible too.
      if (workers === 1) expect(builds).toBe(1);
      else expect(builds).toBeGreaterThanOrEqual(1);
      expect(builds).toBeLessThanOrEqual(workers);
    }
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
