/**
 * The one-line error messages promised to users (exit code 2). Texts are part of the
 * command line's contract, so they are asserted verbatim.
 */
import { describe, expect, test } from 'vitest';
import { InputError } from '../../src/errors.js';
import type { DefinitionSource } from '../../src/definitions/built.js';
import { buildEnvironment } from '../../src/definitions/build-environment.js';
import { buildPolicy } from '../../src/definitions/build-policy.js';
import { parseEnvironment, parsePolicy } from '../../src/definitions/parse.js';

const grid: DefinitionSource = { label: 'envs/grid.json', baseDir: '/nowhere' };
const mdp: DefinitionSource = { label: 'mdp.json', baseDir: '/nowhere' };
const policyFile: DefinitionSource = { label: 'policy.json', baseDir: '/nowhere' };

function gridworld(overrides: Record<string, unknown> = {}) {
  return {
    kind: 'gridworld',
    discount: 0.9,
    horizon: 100,
    layout: ['..~.', '.#.+'],
    cells: { '.': {}, '~': { slip: 0.1 }, '#': { wall: true }, '+': { terminal: true, reward: 1 } },
    ...overrides,
  };
}

function messageOf(run: () => unknown): string {
  try {
    run();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).exitCode).toBe(2);
    return (e as Error).message;
  }
  throw new Error('expected an InputError');
}

async function asyncMessageOf(run: () => Promise<unknown>): Promise<string> {
  try {
    await run();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  throw new Error('expected an InputError');
}

const envError = (json: unknown, source = grid) => messageOf(() => parseEnvironment(json, source));

describe('gridworld messages', () => {
  test('the valid base definition parses', () => {
    expect(parseEnvironment(gridworld(), grid).kind).toBe('gridworld');
  });

  test('slip out of range names the cell with a quoted key', () => {
    const json = gridworld({ cells: { '.': {}, '~': { slip: -0.2 }, '#': { wall: true }, '+': { terminal: true } } });
    expect(envError(json)).toBe('envs/grid.json: cells["~"].slip must be between 0 and 1 (got -0.2)');
  });

  test('rows of different lengths', () => {
    const json = gridworld({ layout: ['..........', '.........#', '.........', '........+.'] });
    expect(envError(json)).toContain('grid.json: layout row 2 has 9 characters, row 0 has 10');
  });

  test('a layout character missing from cells', () => {
    const json = gridworld({ layout: ['~...+', '....Z'] });
    expect(envError(json)).toBe("envs/grid.json: layout row 1, column 4: 'Z' is not in cells");
  });

  test('an unknown key suggests the nearest known one', () => {
    const { discount, ...rest } = gridworld();
    expect(envError({ ...rest, discout: discount })).toContain('grid.json: unknown key "discout" (did you mean "discount"?)');
  });

  test('an unknown cell property is named with its cell', () => {
    const json = gridworld({ cells: { '.': { slp: 0.1 }, '~': {}, '#': { wall: true }, '+': { terminal: true } } });
    expect(envError(json)).toBe('envs/grid.json: cells["."]: unknown key "slp" (did you mean "slip"?)');
  });

  test('an unknown kind', () => {
    expect(envError({ kind: 'gridwold' })).toBe(
      'envs/grid.json: kind must be one of "gridworld", "tabular", "module", "process" (got "gridwold") (did you mean "gridworld"?)',
    );
  });

  test('wrong types and missing fields', () => {
    expect(envError(gridworld({ discount: '0.9' }))).toBe('envs/grid.json: discount must be a number (got "0.9")');
    const { layout: _layout, ...noLayout } = gridworld();
    expect(envError(noLayout)).toBe('envs/grid.json: layout is missing');
    expect(envError([1, 2])).toContain('envs/grid.json: must be an object (got an array)');
  });

  test('discount outside (0, 1] and a non-integer horizon', () => {
    expect(envError(gridworld({ discount: 0 }))).toBe('envs/grid.json: discount must be in (0, 1] (got 0)');
    expect(envError(gridworld({ horizon: 2.5 }))).toBe('envs/grid.json: horizon must be an integer of at least 1 (got 2.5)');
  });

  test('discount 1 needs a horizon', () => {
    const { horizon: _h, ...json } = gridworld({ discount: 1 });
    expect(envError(json)).toBe('envs/grid.json: horizon is required when discount is 1');
  });

  test('a portal target must appear exactly once', () => {
    const json = gridworld({
      layout: ['.A.a', '.#a+'],
      cells: { '.': {}, a: {}, A: { portal: { to: 'a', reward: 3 } }, '#': { wall: true }, '+': { terminal: true } },
    });
    expect(envError(json)).toBe(
      `envs/grid.json: cells.A.portal.to: 'a' appears 2 times in layout; a portal target must appear exactly once`,
    );
  });

  test('a wall cannot be a start or a terminal', () => {
    const json = gridworld({ cells: { '.': {}, '~': {}, '#': { wall: true, start: 1 }, '+': { terminal: true } } });
    expect(envError(json)).toBe(`envs/grid.json: cells["#"]: a wall can't also have "start"`);
  });

  test('start weights must have a positive total', () => {
    const json = gridworld({ cells: { '.': { start: 0 }, '~': {}, '#': { wall: true }, '+': { terminal: true } } });
    expect(envError(json)).toContain(`start weights sum to 0`);
  });

  test('at least one open non-terminal cell', () => {
    const json = gridworld({ layout: ['#+'], cells: { '#': { wall: true }, '+': { terminal: true } } });
    expect(envError(json)).toContain('envs/grid.json: layout: has no open non-terminal cell');
  });
});

describe('tabular messages', () => {
  const base = {
    kind: 'tabular',
    discount: 0.95,
    states: ['q1', 'q2', 'q3'],
    actions: ['m0', 'm1'],
    start: { q1: 1 },
    terminal: ['q2'],
    transitions: [
      { from: 'q1', action: 'm0', to: 'q1', p: 1 },
      { from: 'q1', action: 'm1', to: 'q3', p: 1, reward: 2 },
      { from: 'q3', action: 'm0', to: 'q2', p: 1 },
      { from: 'q3', action: 'm1', to: 'q2', p: 0.5 },
      { from: 'q3', action: 'm1', to: 'q1', p: 0.8 },
    ],
  };

  test('probabilities that do not sum to 1', () => {
    expect(envError(base, mdp)).toBe('mdp.json: probabilities for state "q3", action "m1" sum to 1.3');
  });

  test('a missing (state, action) pair is named', () => {
    const json = { ...base, transitions: base.transitions.slice(0, 3) };
    expect(envError(json, mdp)).toBe('mdp.json: no transitions for state "q3", action "m1"');
  });

  test('a transition to an unknown state, with its index', () => {
    const transitions = [...base.transitions.slice(0, 4), { from: 'q3', action: 'm1', to: 'q4', p: 0.5 }];
    expect(envError({ ...base, transitions }, mdp)).toBe('mdp.json: transitions[4].to: "q4" is not a state (did you mean "q1"?)');
  });

  test('a probability out of range is reported with the transition path', () => {
    const transitions = [...base.transitions.slice(0, 4), { from: 'q3', action: 'm1', to: 'q1', p: 1.5 }];
    expect(envError({ ...base, transitions }, mdp)).toBe('mdp.json: transitions[4].p must be between 0 and 1 (got 1.5)');
  });

  test('duplicate state names', () => {
    expect(envError({ ...base, states: ['q1', 'q2', 'q3', 'q1'] }, mdp)).toContain('mdp.json: states[3]: "q1" is listed twice');
  });
});

describe('policy messages', () => {
  async function gridEnv() {
    return buildEnvironment(parseEnvironment(gridworld(), grid), grid);
  }

  test('an action that the environment does not have', async () => {
    const env = await gridEnv();
    const def = parsePolicy({ kind: 'table', default: 'up', states: { '1,1': 'jump' } }, policyFile);
    expect(await asyncMessageOf(() => buildPolicy(def, env, policyFile))).toContain(
      'policy.json: states["1,1"]: "jump" is not an action of this environment',
    );
  });

  test('an action inside a distribution', async () => {
    const env = await gridEnv();
    const def = parsePolicy({ kind: 'table', states: { '0,0': { up: 0.5, jmp: 0.5 } }, default: 'uniform' }, policyFile);
    expect(await asyncMessageOf(() => buildPolicy(def, env, policyFile))).toContain(
      'policy.json: states["0,0"]: "jmp" is not an action of this environment',
    );
  });

  test('a distribution that does not sum to 1', () => {
    expect(messageOf(() => parsePolicy({ kind: 'table', states: { '0,0': { up: 0.5, down: 0.4 } } }, policyFile))).toBe(
      'policy.json: states["0,0"] must sum to 1 (got 0.9)',
    );
  });

  test('an action given as a number', () => {
    expect(messageOf(() => parsePolicy({ kind: 'table', states: { '0,0': 3 } }, policyFile))).toBe(
      'policy.json: states["0,0"] must be an action name or an object {action: probability} (got 3)',
    );
  });

  test('epsilon out of range and a malformed base', () => {
    const base = { kind: 'uniform' };
    expect(messageOf(() => parsePolicy({ kind: 'epsilon', epsilon: 1.2, base }, policyFile))).toBe(
      'policy.json: epsilon must be between 0 and 1 (got 1.2)',
    );
    expect(messageOf(() => parsePolicy({ kind: 'epsilon', epsilon: 0.1, base: { kind: 'unifrom' } }, policyFile))).toContain(
      'policy.json: base.kind must be one of "uniform", "table", "epsilon", "module", "process", "arrows" (got "unifrom")',
    );
    expect(messageOf(() => parsePolicy({ kind: 'epsilon', epsilon: 0.1, base: { path: 7 } }, policyFile))).toBe(
      'policy.json: base.path must be a string (got 7)',
    );
    expect(
      messageOf(() => parsePolicy({ kind: 'epsilon', epsilon: 0.1, base: { kind: 'table', states: { a: { up: 2 } } } }, policyFile)),
    ).toBe('policy.json: base.states.a must sum to 1 (got 2)');
  });

  test('a state the finite environment does not have', async () => {
    const env = await gridEnv();
    const def = parsePolicy({ kind: 'table', default: 'up', states: { '0,9': 'up' } }, policyFile);
    expect(await asyncMessageOf(() => buildPolicy(def, env, policyFile))).toContain(
      'policy.json: states["0,9"]: not a state of this environment',
    );
  });
});

describe('one line, first problem', () => {
  test('several problems still give one line, without a newline', () => {
    const json = gridworld({ discount: 2, horizon: 0, cells: { '.': { slip: 3 } } });
    const message = envError(json);
    expect(message.split('\n')).toHaveLength(1);
    expect(message).toBe('envs/grid.json: discount must be in (0, 1] (got 2)');
  });

  test('arrow keys must be single characters', () => {
    expect(messageOf(() => parsePolicy({ kind: 'arrows', rows: ['>'], key: { ab: 'up' } }, policyFile))).toBe(
      'policy.json: key: "ab" must be a single character',
    );
  });
});
