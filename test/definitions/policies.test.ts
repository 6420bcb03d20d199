import { describe, expect, test, vi } from 'vitest';
import { InputError } from '../../src/errors.js';
import type { BuiltEnvironment, BuiltPolicy, DefinitionSource, FiniteEnvironment } from '../../src/definitions/built.js';
import { buildEnvironment } from '../../src/definitions/build-environment.js';
import { buildPolicy } from '../../src/definitions/build-policy.js';
import { loadEnvironmentFile, loadPolicyFile } from '../../src/definitions/load.js';
import { parseEnvironment, parsePolicy } from '../../src/definitions/parse.js';
import type { PolicyMatrix } from '../../src/definitions/finite-mdp.js';
import { TEXTBOOK_SAMPLES, FIXTURES, tempFolder } from './temp-files.js';

const files = tempFolder();
const here: DefinitionSource = { label: 'policy.json', baseDir: '/nowhere' };

// A 3×4 grid: start bottom-left, goal top-right, one wall (a scenario of our own).
const gridJson = {
  kind: 'gridworld',
  discount: 0.95,
  horizon: 100,
  layout: ['...G', '.#..', 'S...'],
  cells: { '.': {}, S: { start: 1 }, '#': { wall: true }, G: { terminal: true, reward: 1 } },
};

async function finiteEnv(json: unknown = gridJson): Promise<FiniteEnvironment> {
  const source = { label: 'grid.json', baseDir: '/nowhere' };
  const env = await buildEnvironment(parseEnvironment(json, source), source);
  if (env.kind !== 'finite') throw new Error('expected a finite environment');
  return env;
}

async function build(json: unknown, env: BuiltEnvironment, source = here): Promise<BuiltPolicy> {
  return buildPolicy(parsePolicy(json, source), env, source);
}

function matrixOf(policy: BuiltPolicy): PolicyMatrix {
  if (policy.kind !== 'matrix') throw new Error(`expected a matrix policy, got ${policy.kind}`);
  return policy.matrix;
}

function row(matrix: PolicyMatrix, env: FiniteEnvironment, state: string): number[] {
  const s = env.mdp.stateIndex.get(state)!;
  return [...matrix.probability.slice(s * matrix.actionCount, (s + 1) * matrix.actionCount)];
}

/** A scripted Rng: uniform() returns the queued values; integer(n) returns the queued integers. */
function scriptedRng(uniforms: number[], integers: number[] = []) {
  return {
    uniform: () => uniforms.shift() ?? 0.5,
    integer: (n: number) => (integers.shift() ?? 0) % n,
    uint32: () => 0,
  };
}

describe('table policies on a finite environment', () => {
  const everyState = {
    '0,0': 'right', '0,1': 'right', '0,2': 'right',
    '1,0': 'up', '1,2': 'up', '1,3': 'up',
    '2,0': 'up', '2,1': 'left', '2,2': { up: 0.5, right: 0.5 }, '2,3': 'up',
  };

  test('without a default, covering every non-terminal state (terminals may be named too)', async () => {
    const env = await finiteEnv();
    const m = matrixOf(await build({ kind: 'table', states: { ...everyState, '0,3': 'down' } }, env));
    expect(row(m, env, '0,0')).toEqual([0, 0, 0, 1]);
    expect(row(m, env, '2,2')).toEqual([0.5, 0, 0, 0.5]);
    const s00 = env.mdp.stateIndex.get('0,0')!;
    const s22 = env.mdp.stateIndex.get('2,2')!;
    expect(m.deterministicAction[s00]).toBe(3);
    expect(m.deterministicAction[s22]).toBe(-1);
    expect(m.cumulative[s22 * 4 + 3]).toBe(1);
    expect(m.cumulative[s22 * 4]).toBe(0.5);
  });

  test('without a default, missing states are named with a hint', async () => {
    const env = await finiteEnv();
    const { '1,0': _a, '2,1': _b, '2,3': _c, '1,3': _d, ...partial } = everyState;
    const error = await build({ kind: 'table', states: partial }, env).catch((e) => e);
    expect(error).toBeInstanceOf(InputError);
    expect(error.message).toBe(
      'policy.json: no action for states "1,0", "1,3", "2,1" and 1 more; list them in "states" or add a "default"',
    );
  });

  test('a default fills unlisted states; "uniform" as the default', async () => {
    const env = await finiteEnv();
    const m = matrixOf(await build({ kind: 'table', default: 'uniform', states: { '2,0': 'up' } }, env));
    expect(row(m, env, '2,0')).toEqual([1, 0, 0, 0]);
    expect(row(m, env, '1,0')).toEqual([0.25, 0.25, 0.25, 0.25]);
    const d = matrixOf(await build({ kind: 'table', default: { left: 0.2, down: 0.8 }, states: {} }, env));
    expect(row(d, env, '1,0')).toEqual([0, 0.8, 0.2, 0]);
  });

  test('the AIMA optimal policy (no default) loads on the 4×3 textbook sample', async () => {
    const env = await loadEnvironmentFile(`${TEXTBOOK_SAMPLES}grid-4x3-slip.json`);
    const policy = await loadPolicyFile(`${TEXTBOOK_SAMPLES}grid-4x3-policy.json`, env.built);
    expect(policy.definition.kind).toBe('table');
    expect(policy.built.kind).toBe('matrix');
  });
});

describe('arrows policies', () => {
  test('built-in arrows, "*" for uniform, a key entry, and ignored wall and terminal cells', async () => {
    const env = await finiteEnv();
    const picture = { kind: 'arrows', rows: ['>>>?', '^X^^', '^<z^'], key: { z: { up: 0.5, right: 0.5 } } };
    const m = matrixOf(await build(picture, env));
    expect(row(m, env, '0,0')).toEqual([0, 0, 0, 1]);
    expect(row(m, env, '1,0')).toEqual([1, 0, 0, 0]);
    expect(row(m, env, '2,1')).toEqual([0, 0, 1, 0]);
    expect(row(m, env, '2,2')).toEqual([0.5, 0, 0, 0.5]);
    const star = matrixOf(await build({ kind: 'arrows', rows: ['*>>G', '^#^^', '^<<^'] }, env));
    expect(row(star, env, '0,0')).toEqual([0.25, 0.25, 0.25, 0.25]);
  });

  test('the key can override a built-in symbol', async () => {
    const env = await finiteEnv();
    const m = matrixOf(await build({ kind: 'arrows', rows: ['>>>.', '^#^^', '^^^^'], key: { '^': 'down' } }, env));
    expect(row(m, env, '2,0')).toEqual([0, 1, 0, 0]);
  });

  test('an unknown symbol at an open cell and a picture of the wrong shape are errors', async () => {
    const env = await finiteEnv();
    await expect(build({ kind: 'arrows', rows: ['>>>G', '^#^^', '^?^^'] }, env)).rejects.toThrow(
      `policy.json: rows[2], column 1: '?' is not an arrow (use ^ v < > * or add it to "key")`,
    );
    await expect(build({ kind: 'arrows', rows: ['>>>G', '^#^^'] }, env)).rejects.toThrow('rows has 2 rows, the layout has 3');
    await expect(build({ kind: 'arrows', rows: ['>>>G', '^#^', '^^^^'] }, env)).rejects.toThrow(
      'rows[1] has 3 characters, the layout has 4 columns',
    );
  });
});

describe('epsilon policies', () => {
  test('base from a path relative to the policy file: ε/n + (1−ε)·base', async () => {
    const env = await finiteEnv();
    files.write('greedy.json', { kind: 'table', default: 'up', states: { '0,0': 'right' } });
    const path = files.write('explore.json', { kind: 'epsilon', epsilon: 0.2, base: { path: 'greedy.json' } });
    const m = matrixOf((await loadPolicyFile(path, env)).built);
    const expected = [0.05, 0.05, 0.05, 0.85];
    row(m, env, '0,0').forEach((p, a) => expect(p).toBeCloseTo(expected[a], 15));
    expect(m.deterministicAction[env.mdp.stateIndex.get('0,0')!]).toBe(-1);
  });

  test('errors in the base file carry the base file name', async () => {
    const env = await finiteEnv();
    files.write('broken-base.json', { kind: 'table', default: 'jump' });
    const path = files.write('uses-broken.json', { kind: 'epsilon', epsilon: 0.1, base: { path: 'broken-base.json' } });
    await expect(loadPolicyFile(path, env)).rejects.toThrow('broken-base.json: default: "jump" is not an action');
  });

  test('a cycle of base files is an error, not a hang', async () => {
    const env = await finiteEnv();
    files.write('ping.json', { kind: 'epsilon', epsilon: 0.1, base: { path: 'pong.json' } });
    const pong = files.write('pong.json', { kind: 'epsilon', epsilon: 0.1, base: { path: 'ping.json' } });
    await expect(loadPolicyFile(pong, env)).rejects.toThrow('leads back to a policy file already being loaded');
  });

  test('inline base and nested epsilon', async () => {
    const env = await finiteEnv();
    const m = matrixOf(
      await build({ kind: 'epsilon', epsilon: 0.5, base: { kind: 'epsilon', epsilon: 0.5, base: { kind: 'table', default: 'down', states: {} } } }, env),
    );
    // inner: 0.125 each + 0.5 on down; outer: 0.125 + 0.5·that
    row(m, env, '1,0').forEach((p, a) => expect(p).toBeCloseTo(a === 1 ? 0.125 + 0.5 * 0.625 : 0.125 + 0.5 * 0.125, 15));
  });
});

describe('module environment and module policy', () => {
  test('the lighthouse module loads; the horizon is derived from rewardBounds', async () => {
    const env = await loadEnvironmentFile(`${FIXTURES}lighthouse-env.json`);
    if (env.built.kind !== 'module') throw new Error('expected a module environment');
    expect(env.built.actionNames).toEqual(['rest', 'climb']);
    expect(env.built.rewardRange).toEqual([0, 1]);
    // γ = 0.9, R = 1, default ε = 1e-4: smallest H with 0.9^H/0.1 ≤ 1e-4, which is 110
    // (docs/methods.md §2, eq. 2.2; recomputed by scripts/methods/truncation.py)
    expect(env.built.horizon).toBe(110);
    expect(env.built.horizonDerived).toBe(true);
    const out = { state: 0, reward: 0, done: false };
    env.built.env.step(2, 1, scriptedRng([0.1]), out);
    expect(out).toEqual({ state: 3, reward: 1, done: true });
  });

  test('a code policy returning names acts by index', async () => {
    const env = await loadEnvironmentFile(`${FIXTURES}lighthouse-env.json`);
    const policy = (await loadPolicyFile(`${FIXTURES}keeper-policy.json`, env.built)).built;
    if (policy.kind !== 'code') throw new Error('expected a code policy');
    expect(policy.acting.act(0, scriptedRng([0.1]))).toBe(1);
    expect(policy.acting.act(0, scriptedRng([0.9]))).toBe(0);
    expect(policy.matrix).toBeNull();
  });

  test('table and epsilon policies act through code, looking states up by stateName', async () => {
    const env = (await loadEnvironmentFile(`${FIXTURES}lighthouse-env.json`)).built;
    const table = await build({ kind: 'table', states: { 'landing 0': 'climb', 'landing 1': { rest: 0.25, climb: 0.75 } } }, env);
    if (table.kind !== 'code') throw new Error('expected a code policy');
    expect(table.acting.act(0, scriptedRng([]))).toBe(1);
    expect(table.acting.act(1, scriptedRng([0.2]))).toBe(0);
    expect(table.acting.act(1, scriptedRng([0.3]))).toBe(1);
    expect(() => table.acting.act(2, scriptedRng([]))).toThrow('no action for state "landing 2" and no "default"');

    const eps = await build({ kind: 'epsilon', epsilon: 0.3, base: { kind: 'table', default: 'rest', states: {} } }, env);
    if (eps.kind !== 'code') throw new Error('expected a code policy');
    expect(eps.acting.act(5, scriptedRng([0.29], [1]))).toBe(1); // u < ε: uniform draw
    expect(eps.acting.act(5, scriptedRng([0.31], [1]))).toBe(0); // else the base
    await expect(build({ kind: 'table', default: 'jump', states: {} }, env)).rejects.toThrow(
      'policy.json: default: "jump" is not an action of this environment',
    );
  });

  test('a module policy on a finite environment is tabulated from probabilities()', async () => {
    const env = await finiteEnv({
      ...gridJson,
      kind: 'gridworld',
    });
    files.write('drift.js', `export default (options, context) => ({
      act: (state) => (state === '2,0' ? 'up' : context.actions.indexOf('right')),
      probabilities: (state) => (state === '2,0' ? { up: 1 } : [0, 0, 1 - options.right, options.right]),
    });`);
    const source = { label: files.path('drift.json'), baseDir: files.path('') };
    const policy = await build({ kind: 'module', path: './drift.js', options: { right: 0.75 } }, env, source);
    if (policy.kind !== 'code' || !policy.matrix) throw new Error('expected a code policy with a matrix');
    expect(row(policy.matrix, env, '2,0')).toEqual([1, 0, 0, 0]);
    expect(row(policy.matrix, env, '0,0')).toEqual([0, 0, 0.25, 0.75]);
    expect(policy.acting.act('2,0', scriptedRng([]))).toBe(0);
    expect(policy.acting.act(env.mdp.stateIndex.get('2,0')!, scriptedRng([]))).toBe(0);
    expect(policy.acting.act('0,0', scriptedRng([]))).toBe(3);
  });

  test('module problems are input errors with clear messages', async () => {
    const source = { label: files.path('env.json'), baseDir: files.path('') };
    const envError = async (json: unknown) => buildEnvironment(parseEnvironment(json, source), source).catch((e: Error) => e.message);
    expect(await envError({ kind: 'module', path: './absent.js' })).toContain('module "./absent.js" not found');
    files.write('no-default.js', 'export const x = 1;');
    expect(await envError({ kind: 'module', path: './no-default.js' })).toContain('must have a default export that is a function');
    files.write('no-actions.js', 'export default () => ({ actions: [], discount: 0.9, horizon: 5, reset() {}, step() {} });');
    expect(await envError({ kind: 'module', path: './no-actions.js' })).toContain(
      'environment from "./no-actions.js": actions must have at least 1 entry',
    );
    files.write('no-horizon.js', 'export default () => ({ actions: ["a"], discount: 0.9, reset() {}, step() {} });');
    expect(await envError({ kind: 'module', path: './no-horizon.js' })).toContain('neither "horizon" nor "rewardBounds"');
    files.write('undiscounted.js', 'export default () => ({ actions: ["a"], discount: 1, rewardBounds: [0, 1], reset() {}, step() {} });');
    expect(await envError({ kind: 'module', path: './undiscounted.js' })).toContain('a horizon is required when discount is 1');
    files.write('no-step.js', 'export default async () => ({ actions: ["a"], discount: 0.9, horizon: 3, reset() {} });');
    expect(await envError({ kind: 'module', path: './no-step.js' })).toContain('step is missing');
    files.write('throws.js', 'export default () => { throw new Error("no lamp oil"); };');
    expect(await envError({ kind: 'module', path: './throws.js' })).toContain('threw while being created: no lamp oil');
    files.write('both-names.js', 'export default () => ({ actions: ["a"], discount: 0.9, rewardBounds: [0, 1], rewardRange: [0, 1], reset() {}, step() {} });');
    expect(await envError({ kind: 'module', path: './both-names.js' })).toContain('gives both "rewardBounds" and its old name "rewardRange"');
  });

  test('the old name rewardRange still works, with one warning on stderr', async () => {
    const source = { label: files.path('old.json'), baseDir: files.path('') };
    files.write('old-name.js', 'export default () => ({ actions: ["a"], discount: 0.9, rewardRange: [-1, 2], reset() {}, step() {} });');
    const written: string[] = [];
    const spy = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => (written.push(String(chunk)), true));
    try {
      for (let i = 0; i < 2; i++) {
        const env = await buildEnvironment(parseEnvironment({ kind: 'module', path: './old-name.js' }, source), source);
        if (env.kind !== 'module') throw new Error('expected a module environment');
        expect(env.rewardRange).toEqual([-1, 2]);
      }
    } finally {
      spy.mockRestore();
    }
    expect(written).toHaveLength(1);
    expect(written[0]).toMatch(/^reckon: warning: .*old\.json: environment from "\.\/old-name\.js": "rewardRange" is deprecated; rename it "rewardBounds"/);
  });
});
