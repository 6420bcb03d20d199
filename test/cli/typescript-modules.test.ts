import { describe, expect, it } from 'vitest';
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { reckon, tempFiles } from './run-cli.js';

/**
 * A `.ts` module runs with no build step: types are stripped, not checked; relative imports
 * written TypeScript's way (`./x.js` for `./x.ts`) resolve; the compiled output is cached by
 * the source's hash; a syntax error names the file, line and column (exit 2). The reference
 * for the figures is the same module written as plain JavaScript.
 */
const PLUGIN = path.resolve(__dirname, '../../src/plugin.js');

const TS_ENV = `
import type { Environment, Rng, StepResult } from ${JSON.stringify(PLUGIN)};
import { FERRY_SEATS } from './ferry-constants.js';

interface Options { meanPassengers?: number }

/** A river ferry's crossings: passengers arrive (Poisson), the ferry leaves now or waits. */
export default function create(options: Options): Environment<number> {
  const mean: number = options.meanPassengers ?? 6;
  return {
    actions: ['leave', 'wait'],
    discount: 0.97,
    horizon: 25,
    reset: (rng: Rng): number => rng.poisson(mean),
    step(waiting: number, action: number, rng: Rng, out: StepResult<number>): StepResult<number> {
      const boarded = action === 0 ? Math.min(waiting, FERRY_SEATS) : 0;
      out.state = waiting - boarded + rng.poisson(mean);
      out.reward = boarded - (action === 0 ? 4 : 0) - 0.1 * out.state;
      out.done = false;
      return out;
    },
  };
}
`;
const JS_ENV = TS_ENV.replace(/^import type .*$/m, '')
  .replace("'./ferry-constants.js'", "'./ferry-constants-plain.js'")
  .replace(/interface Options \{[^}]*\}/, '')
  .replace('(options: Options): Environment<number>', '(options)')
  .replace('const mean: number', 'const mean')
  .replace('(rng: Rng): number =>', '(rng) =>')
  .replace('(waiting: number, action: number, rng: Rng, out: StepResult<number>): StepResult<number>', '(waiting, action, rng, out)');

describe('TypeScript modules', () => {
  const dir = tempFiles({
    'ferry.ts': TS_ENV,
    'ferry-constants.ts': 'export const FERRY_SEATS: number = 12;\n',
    'ferry.js': JS_ENV,
    'ferry-constants-plain.js': 'export const FERRY_SEATS = 12;\n',
    'ferry-ts.json': { kind: 'module', path: './ferry.ts', options: { meanPassengers: 5 } },
    'ferry-js.json': { kind: 'module', path: './ferry.js', options: { meanPassengers: 5 } },
    'mixed.ts': 'export default (options: {}, context: { actions: readonly string[] }) => ({ act: (state: number, rng: any) => (state > 8 ? 0 : 1) });\n',
    'policy-ts.json': { kind: 'module', path: './mixed.ts' },
    'typed-wrong.ts': TS_ENV.replace('const mean: number = options.meanPassengers ?? 6;', 'const mean: string = (options.meanPassengers ?? 6) as any; const oops: string = 5;'),
    'typed-wrong.json': { kind: 'module', path: './typed-wrong.ts', options: { meanPassengers: 5 } },
    'broken.ts': 'export default function create() {\n  return {\n    actions: ["a"]\n    discount: 0.9,\n  };\n}\n',
    'broken.json': { kind: 'module', path: './broken.ts' },
  });
  const cache = path.join(dir, 'cache');
  const run = (args: string[]) => reckon(args, { cwd: dir, env: { RECKON_CACHE_DIR: cache } });
  const estimate = (env: string, policy: string, workers: string) =>
    run(['estimate', '--env', env, '--policy', policy, '--episodes', '1500', '--seed', '4', '--workers', workers, '--no-store', '--json']);

  it('a .ts environment and policy run unchanged, with the figures of the same module in JavaScript, on any worker count', () => {
    const js = estimate('ferry-js.json', 'policy-ts.json', '1');
    expect(js.code, js.stderr).toBe(0);
    const ts1 = estimate('ferry-ts.json', 'policy-ts.json', '1');
    expect(ts1.code, ts1.stderr).toBe(0);
    const ts2 = estimate('ferry-ts.json', 'policy-ts.json', '2');
    for (const key of ['mean', 'std', 'ci', 'mean_length']) {
      expect(JSON.parse(ts1.stdout)[key]).toStrictEqual(JSON.parse(js.stdout)[key]);
      expect(JSON.parse(ts2.stdout)[key]).toStrictEqual(JSON.parse(js.stdout)[key]);
    }
    // One cache entry per TypeScript source file, reused by later runs and threads.
    const entries = readdirSync(path.join(cache, 'typescript'));
    expect(entries.filter((f) => f.endsWith('.mjs'))).toHaveLength(3);
    expect(run(['check', '--env', 'ferry-ts.json', '--policy', 'policy-ts.json']).code).toBe(0);
    expect(readdirSync(path.join(cache, 'typescript'))).toStrictEqual(entries);
  });

  it('type errors are not run-time errors', () => {
    const out = estimate('typed-wrong.json', 'policy-ts.json', '1');
    expect(out.code, out.stderr).toBe(0);
    expect(JSON.parse(out.stdout).mean).toBe(JSON.parse(estimate('ferry-js.json', 'policy-ts.json', '1').stdout).mean);
  });

  it('a syntax error names the file, line and column (exit 2)', () => {
    const out = run(['check', '--env', 'broken.json']);
    expect(out.code).toBe(2);
    expect(out.stderr.trim()).toBe("reckon: broken.json: syntax error in broken.ts:4:5: ',' expected.");
  });
});
