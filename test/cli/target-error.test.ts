import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { ENVS, reckon, tempFiles } from './run-cli.js';

/** Target-error runs and the betting interval through the command line. */
function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('target-error runs on the betting sequence', () => {
  const dir = tempFiles({});
  const store = ['--store', path.join(dir, 'runs.sqlite')];
  const careful = ['--env', path.join(ENVS, 'warehouse.json'), '--policy', path.join(ENVS, 'picker-careful.json')];

  it('default to betting, reach the target, and runs show recomputes the interval bit for bit whatever the workers', () => {
    const one = json(reckon(['estimate', ...careful, '--target-error', '0.01', '--seed', '12', '--workers', '1', '--json', ...store]));
    const two = json(reckon(['estimate', ...careful, '--target-error', '0.01', '--seed', '12', '--workers', '2', '--json', ...store]));
    expect(one.ci).toMatchObject({ method: 'betting', anytime_valid: true });
    expect(one.target_reached).toBe(true);
    expect(one.ci.half_width).toBeLessThanOrEqual(0.01);
    expect(two.episodes).toBe(one.episodes);
    expect(two.ci).toStrictEqual(one.ci);
    const shown = json(reckon(['runs', 'show', one.run_id, '--json', ...store]));
    expect(shown.ci).toStrictEqual(one.ci);
    expect(shown.episodes).toBe(one.episodes);
  });

  it('runs show refuses a fixed-sample --ci on a target-error run (exit 2) unless --ignore-stop asks for the what-if; another sequence is allowed', () => {
    const run = json(reckon(['estimate', ...careful, '--target-error', '0.02', '--seed', '3', '--json', ...store]));
    const refused = reckon(['runs', 'show', run.run_id, '--ci', 't', ...store]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/fixed-sample interval.*--ignore-stop/);
    const whatIf = json(reckon(['runs', 'show', run.run_id, '--ci', 't', '--ignore-stop', '--json', ...store]));
    expect(whatIf.ci.method).toBe('t');
    expect(whatIf.target_error).toBeNull();
    const other = json(reckon(['runs', 'show', run.run_id, '--ci', 'empirical-bernstein', '--json', ...store]));
    expect(other.ci).toMatchObject({ method: 'empirical-bernstein', anytime_valid: true });
  });

  it('the report prints an off-centre interval as mean (low … high), never as mean ± h', () => {
    const out = reckon(['estimate', ...careful, '--target-error', '0.02', '--seed', '3', '--no-store']);
    expect(out.code).toBe(0);
    const line = out.stdout.split('\n').find((l) => l.includes('expected return'))!;
    expect(line).toMatch(/expected return\s+\S+ \(\S+ … \S+\)/);
    expect(line).not.toContain('±');
  });

  it('--ci betting on a fixed-size run is anytime-valid and needs bounds', () => {
    const out = json(reckon(['estimate', ...careful, '--episodes', '3000', '--ci', 'betting', '--seed', '4', '--json', '--no-store']));
    expect(out.ci).toMatchObject({ method: 'betting', anytime_valid: true });
    expect(out.ci.low).toBeLessThan(out.mean);
    expect(out.ci.high).toBeGreaterThan(out.mean);
    const restock = reckon(['estimate', '--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(ENVS, 'restock-base-stock.json'), '--episodes', '200', '--ci', 'betting', '--bounds', '0,1', '--seed', '1', '--no-store']);
    expect(restock.code).toBe(2); // returns outside the given bounds are refused, never clipped
    expect(restock.stderr).toMatch(/outside the bounds/);
  });

  it('warns at small n for approximate intervals and names the method to prefer', () => {
    const out = json(reckon(['estimate', ...careful, '--episodes', '30', '--ci', 'normal', '--seed', '4', '--json', '--no-store']));
    expect(out.warnings.join(' ')).toMatch(/30 episodes is few.*prefer --ci t/);
    const many = json(reckon(['estimate', ...careful, '--episodes', '500', '--ci', 'normal', '--seed', '4', '--json', '--no-store']));
    expect(many.warnings).toEqual([]);
  });
});
