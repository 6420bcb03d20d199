import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { buildApp } from '../../src/server/app.js';
import { ENVS, reckon, tempFiles } from './run-cli.js';

/**
 * Reports of finite environments print the exact value beside the estimate and say whether
 * the interval holds it. The check value is the book's: Russell & Norvig, AIMA 3rd ed.,
 * Fig. 17.3, U(1,1) = 0.705 under the optimal policy of the 4×3 world (printed to 3 decimals;
 * the horizon of 2,000 steps moves it by far less).
 */
const T = path.join(ENVS, 'textbook');
const env = ['--env', path.join(T, 'grid-4x3.json')];
const optimal = path.join(T, 'grid-4x3-optimal.json');
const uniform = path.join(T, 'uniform.json');

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('the exact value beside the estimate', () => {
  const store = path.join(tempFiles({}), 'runs.sqlite');

  it('estimate, runs show and the API give it with inside/outside the interval', async () => {
    const run = json(reckon(['estimate', ...env, '--policy', optimal, '--episodes', '3000', '--seed', '2', '--store', store, '--json']));
    expect(run.exact_value).toBeCloseTo(0.705, 3);
    expect(run.exact_inside).toBe(run.ci.low <= run.exact_value && run.exact_value <= run.ci.high);
    const text = reckon(['estimate', ...env, '--policy', optimal, '--episodes', '3000', '--seed', '2', '--no-store']).stdout;
    expect(text).toMatch(new RegExp(`exact value +0\\.705\\d* \\(reckon exact\\): ${run.exact_inside ? 'inside' : 'OUTSIDE'} the interval`));
    const shown = json(reckon(['runs', 'show', run.run_id, '--store', store, '--json']));
    expect([shown.exact_value, shown.exact_inside]).toEqual([run.exact_value, run.exact_inside]);
    expect(reckon(['runs', 'show', run.run_id, '--store', store]).stdout).toMatch(/exact value +0\.705/);
    const app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    try {
      const api = (await app.inject({ url: `/api/runs/${run.run_id}` })).json();
      expect([api.exact_value, api.exact_inside]).toEqual([run.exact_value, run.exact_inside]);
    } finally {
      await app.close();
    }
  });

  it('compare gives each policy its exact value; a code environment has none', () => {
    const compared = json(reckon(['compare', ...env, '--policy', optimal, '--policy', uniform, '--episodes', '2000', '--seed', '4', '--no-store', '--json']));
    expect(compared.policies[0].exact_value).toBeCloseTo(0.705, 3);
    for (const p of compared.policies) expect(p.exact_inside).toBe(p.ci.low <= p.exact_value && p.exact_value <= p.ci.high);
    // The uniform policy's value is lower than the optimal one's (AIMA's optimality of Fig. 17.2).
    expect(compared.policies[1].exact_value).toBeLessThan(compared.policies[0].exact_value);
    expect(reckon(['compare', ...env, '--policy', optimal, '--policy', uniform, '--episodes', '2000', '--seed', '4', '--no-store']).stdout).toMatch(/Exact values \(reckon exact\)[\s\S]*\[0\] 0\.705\d* +(inside|OUTSIDE) its interval/);

    const restock = json(reckon(['estimate', '--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(ENVS, 'restock-base-stock.json'), '--episodes', '200', '--seed', '1', '--no-store', '--json']));
    expect([restock.exact_value, restock.exact_inside]).toEqual([null, null]);
  });
});
