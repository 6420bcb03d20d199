import { describe, expect, it } from 'vitest';
import { reckon, tempFiles } from './run-cli.js';

/**
 * Every malformed definition or option: exit code 2 and one line on stderr that names the
 * file (or option) and the place. The expected texts are the
 * refusals the README shows.
 */
const goodGrid = {
  kind: 'gridworld',
  discount: 0.9,
  layout: ['..........', '....+.....', '..........'],
  cells: { '.': {}, '+': { terminal: true, reward: 1 } },
};

function expectBadInput(result: { code: number | null; stderr: string }, text: string): void {
  expect(result.code).toBe(2);
  expect(result.stderr).toContain(text);
  expect(result.stderr.trim().split('\n')).toHaveLength(1);
  expect(result.stderr).not.toMatch(/\n\s+at /); // no stack trace
}

describe('bad definition files', () => {
  it('a slip outside [0, 1]', () => {
    const dir = tempFiles({ 'grid.json': { ...goodGrid, cells: { ...goodGrid.cells, '.': {}, '~': { slip: -0.2 } }, layout: ['...~......', '....+.....', '..........'] } });
    expectBadInput(reckon(['check', '--env', 'grid.json'], { cwd: dir }), 'grid.json: cells["~"].slip must be between 0 and 1 (got -0.2)');
  });

  it('layout rows of different lengths', () => {
    const dir = tempFiles({ 'grid.json': { ...goodGrid, layout: ['..........', '....+.....', '.........'] } });
    expectBadInput(reckon(['check', '--env', 'grid.json'], { cwd: dir }), 'grid.json: layout row 2 has 9 characters, row 0 has 10');
  });

  it('a layout character missing from cells', () => {
    const dir = tempFiles({ 'grid.json': { ...goodGrid, layout: ['..........', '....Z+....', '..........'] } });
    expectBadInput(reckon(['check', '--env', 'grid.json'], { cwd: dir }), "grid.json: layout row 1, column 4: 'Z' is not in cells");
  });

  it('transition probabilities that do not sum to 1', () => {
    const mdp = {
      kind: 'tabular',
      discount: 0.9,
      states: ['q1', 'q3', 'end'],
      actions: ['m1'],
      start: { q1: 1 },
      terminal: ['end'],
      transitions: [
        { from: 'q1', action: 'm1', to: 'q3', p: 1, reward: 0 },
        { from: 'q3', action: 'm1', to: 'end', p: 0.8, reward: 1 },
        { from: 'q3', action: 'm1', to: 'q1', p: 0.5, reward: 0 },
      ],
    };
    const dir = tempFiles({ 'mdp.json': mdp });
    expectBadInput(reckon(['check', '--env', 'mdp.json'], { cwd: dir }), 'mdp.json: probabilities for state "q3", action "m1" sum to 1.3');
  });

  it('a policy naming an action the environment does not have', () => {
    const dir = tempFiles({ 'grid.json': goodGrid, 'policy.json': { kind: 'table', default: 'up', states: { '1,1': 'jump' } } });
    expectBadInput(
      reckon(['check', '--env', 'grid.json', '--policy', 'policy.json'], { cwd: dir }),
      'policy.json: states["1,1"]: "jump" is not an action of this environment',
    );
  });

  it('JSON syntax errors with line and column', () => {
    const dir = tempFiles({ 'grid.json': '{\n  "kind": "gridworld",\n  "discount": 0.9,,\n}\n' });
    const result = reckon(['check', '--env', 'grid.json'], { cwd: dir });
    expectBadInput(result, 'grid.json: ');
    expect(result.stderr).toMatch(/line 3, column \d+/);
  });

  it('an empty file and a missing file', () => {
    const dir = tempFiles({ 'grid.json': '' });
    expectBadInput(reckon(['check', '--env', 'grid.json'], { cwd: dir }), 'grid.json: ');
    expectBadInput(reckon(['check', '--env', 'nothing-here.json'], { cwd: dir }), 'nothing-here.json: ');
  });

  it('a module with a syntax error: the line and column of the error', () => {
    const dir = tempFiles({
      'env.json': { kind: 'module', path: './typo.js' },
      'typo.js': 'export default () => ({\n  actions: ["a"],\n  discount: 0.9 horizon: 3,\n});\n',
    });
    expectBadInput(reckon(['check', '--env', 'env.json'], { cwd: dir }), `env.json: could not load module "./typo.js": syntax error at line 3, column 17: Unexpected identifier 'horizon'`);
  });

  it('a missing base.path file is reported by the file that refers to it', () => {
    const dir = tempFiles({ 'grid.json': goodGrid, 'noisy.json': { kind: 'epsilon', epsilon: 0.1, base: { path: 'gone.json' } } });
    expectBadInput(reckon(['check', '--env', 'grid.json', '--policy', 'noisy.json'], { cwd: dir }), 'noisy.json: base.path "gone.json" names a file that does not exist');
  });

  it('a misspelled key is refused, never silently defaulted', () => {
    const dir = tempFiles({ 'grid.json': { ...goodGrid, discout: 0.5 } });
    expectBadInput(reckon(['check', '--env', 'grid.json'], { cwd: dir }), 'discout');
  });
});

describe('bad options', () => {
  const dir = tempFiles({ 'grid.json': goodGrid, 'uniform.json': { kind: 'uniform' } });
  const base = ['estimate', '--env', 'grid.json', '--policy', 'uniform.json'];

  it.each([
    [['--episodes', 'many'], '--episodes'],
    [['--episodes', '1'], '--episodes'],
    [['--confidence', '95'], '--confidence'],
    [['--ci', 'wide'], '--ci'],
    [['--bounds', '5,1'], '--bounds'],
    [['--workers', '0'], '--workers'],
    [['--seed', '-3'], '--seed'],
    [['--target-error', '0'], '--target-error'],
    [['--start', '9,9'], '--start'],
    [['--frobnicate'], "'reckon estimate --help'"],
  ])('%j is refused naming %s', (extra, name) => {
    expectBadInput(reckon([...base, ...extra], { cwd: dir }), name);
  });

  it('values that start with a minus sign are values: --bounds -10,5 works; --seed, --episodes, --target-error get their range message', () => {
    const ok = reckon([...base, '--episodes', '200', '--seed', '1', '--ci', 'hoeffding', '--bounds', '-10,5', '--no-store', '--json'], { cwd: dir });
    expect(ok.code).toBe(0);
    expect(JSON.parse(ok.stdout).return_bounds).toEqual({ low: -10, high: 5, source: 'user' });
    expectBadInput(reckon([...base, '--seed', '-3'], { cwd: dir }), '--seed: must be between 0 and');
    expectBadInput(reckon([...base, '--episodes', '-5'], { cwd: dir }), '--episodes: must be between 2 and');
    expectBadInput(reckon([...base, '--target-error', '-0.1'], { cwd: dir }), '--target-error: must be a positive number');
    expect(reckon([...base, '--seed', '-3'], { cwd: dir }).stderr).not.toContain('ambiguous');
  });

  it('an output path that cannot be written exits 2 naming the path', () => {
    const store = `${dir}/runs.sqlite`;
    const run = JSON.parse(reckon([...base, '--episodes', '100', '--seed', '1', '--store', store, '--json'], { cwd: dir }).stdout);
    const missing = `${dir}/no/such/folder/x.svg`;
    expectBadInput(reckon(['runs', 'plot', run.run_id, '--store', store, '--out', missing]), `--out: cannot write ${missing}: the folder ${dir}/no/such/folder does not exist`);
    expectBadInput(reckon(['runs', 'export', run.run_id, '--store', store, '--out', `${dir}/no/x.csv`]), `--out: cannot write ${dir}/no/x.csv`);
    expectBadInput(reckon(['runs', 'export', run.run_id, '--store', store, '--out', dir]), 'it is a folder');
  });

  it('a value map of a tabular run is refused for the right reason: it has no layout', () => {
    const tab = tempFiles({
      'mdp.json': { kind: 'tabular', discount: 0.9, states: ['a', 'done'], actions: ['go'], start: { a: 1 }, terminal: ['done'], transitions: [{ from: 'a', action: 'go', to: 'done', p: 1, reward: 1 }] },
      'uniform.json': { kind: 'uniform' },
    });
    const store = `${tab}/runs.sqlite`;
    const run = JSON.parse(reckon(['estimate', '--env', 'mdp.json', '--policy', 'uniform.json', '--episodes', '50', '--seed', '1', '--store', store, '--json'], { cwd: tab }).stdout);
    expectBadInput(reckon(['runs', 'plot', run.run_id, '--store', store, '--kind', 'value-map', '--out', `${tab}/map.svg`]), `value-map draws a gridworld's layout, and run ${run.run_id}'s environment is tabular`);
  });

  it('a missing --env says what to give', () => {
    expectBadInput(reckon(['estimate', '--policy', 'uniform.json'], { cwd: dir }), '--env');
  });

  it('an unknown command points to the help', () => {
    expectBadInput(reckon(['estimat']), 'reckon --help');
  });
});
