import { describe, expect, test } from 'vitest';
import type { DefinitionSource } from '../../src/definitions/built.js';
import type { FiniteMdp } from '../../src/definitions/finite-mdp.js';
import { compileGridworld } from '../../src/definitions/gridworld.js';
import { loadEnvironmentFile, loadPolicyFile } from '../../src/definitions/load.js';
import { parseEnvironment } from '../../src/definitions/parse.js';
import type { GridworldDefinition } from '../../src/definitions/schemas.js';
import { evaluatePolicy, outcomesByName } from './policy-evaluation.js';
import { TEXTBOOK_SAMPLES } from './temp-files.js';

const source: DefinitionSource = { label: 'grid.json', baseDir: '/nowhere' };

function compile(json: unknown): FiniteMdp {
  return compileGridworld(parseEnvironment(json, source) as GridworldDefinition, source);
}

/** Checks a compiled row against hand-derived (next, probability, reward) triples. */
function expectOutcomes(mdp: FiniteMdp, state: string, action: string, expected: Array<[string, number, number]>) {
  const actual = outcomesByName(mdp, state, action);
  expect(actual.map(([n, , r]) => [n, r])).toEqual(expected.map(([n, , r]) => [n, r]));
  actual.forEach(([, p], i) => expect(p).toBeCloseTo(expected[i][1], 12));
}

describe('a 2×3 grid with slip 0.2', () => {
  // Transition model of the AIMA 4×3 world (Russell & Norvig, AIMA 3rd ed. §17.1, from memory):
  // intended move 0.8, each perpendicular 0.1; a blocked move stays put. Values below derived by hand.
  const mdp = compile({
    kind: 'gridworld',
    discount: 0.9,
    horizon: 50,
    step_reward: -0.1,
    bump_reward: -0.5,
    layout: ['a.+', '.#-'],
    cells: {
      '.': { slip: 0.2 },
      a: { slip: 0.2, start: 1 },
      '#': { wall: true },
      '+': { terminal: true, reward: 1 },
      '-': { terminal: true, reward: -1 },
    },
  });

  test('states are the non-wall cells, named row,col', () => {
    expect(mdp.stateNames).toEqual(['0,0', '0,1', '0,2', '1,0', '1,2']);
    expect([...mdp.terminal]).toEqual([0, 0, 1, 0, 1]);
    expect(mdp.actionNames).toEqual(['up', 'down', 'left', 'right']);
    expect([...mdp.startProbability]).toEqual([1, 0, 0, 0, 0]);
  });

  test('up from the corner: 0.8 off the grid and 0.1 left off the grid merge into one bump', () => {
    expectOutcomes(mdp, '0,0', 'up', [
      ['0,0', 0.9, -0.6],
      ['0,1', 0.1, -0.1],
    ]);
  });

  test('right from the corner: intended 0.8, perpendiculars 0.1 each', () => {
    expectOutcomes(mdp, '0,0', 'right', [
      ['0,0', 0.1, -0.6],
      ['0,1', 0.8, -0.1],
      ['1,0', 0.1, -0.1],
    ]);
  });

  test('into the goal pays its arrival reward; both perpendiculars blocked (edge, wall) merge', () => {
    expectOutcomes(mdp, '0,1', 'right', [
      ['0,1', 0.2, -0.6],
      ['0,2', 0.8, 0.9],
    ]);
    expectOutcomes(mdp, '0,1', 'down', [
      ['0,0', 0.1, -0.1],
      ['0,1', 0.8, -0.6],
      ['0,2', 0.1, 0.9],
    ]);
  });

  test('cumulative sums end in exactly 1 and terminal rows are reward-0 self-loops', () => {
    for (let sa = 0; sa < mdp.stateCount * mdp.actionCount; sa++) {
      expect(mdp.outcomeCumulative[mdp.outcomeStart[sa + 1] - 1]).toBe(1);
    }
    expectOutcomes(mdp, '0,2', 'left', [['0,2', 1, 0]]);
  });

  test('reward range counts reachable rows only; the grid shape is filled in', () => {
    expect(mdp.rewardRange).toEqual([-0.6, 0.9]);
    expect(mdp.grid!.rows).toBe(2);
    expect(mdp.grid!.cols).toBe(3);
    expect([...mdp.grid!.cellState]).toEqual([0, 1, 2, 3, -1, 4]);
    expect(mdp.grid!.cellChar).toEqual(['a', '.', '+', '.', '#', '-']);
    expect(mdp.horizon).toBe(50);
    expect(mdp.horizonDerived).toBe(false);
  });
});

describe('portals and starts', () => {
  test('a portal jumps whatever the action and pays its reward plus the target cell reward', () => {
    const mdp = compile({
      kind: 'gridworld',
      discount: 0.9,
      horizon: 10,
      step_reward: -1,
      layout: ['A.a', '..x'],
      cells: { '.': {}, x: { terminal: true }, a: { reward: 2 }, A: { portal: { to: 'a', reward: 5 } } },
    });
    for (const action of mdp.actionNames) expectOutcomes(mdp, '0,0', action, [['0,2', 1, -1 + 5 + 2]]);
  });

  test('without start weights the start is uniform over open non-terminal cells', () => {
    const mdp = compile({
      kind: 'gridworld',
      discount: 0.5,
      layout: ['..#', '.+.'],
      cells: { '.': {}, '#': { wall: true }, '+': { terminal: true, reward: 1 } },
    });
    expect(mdp.stateNames).toEqual(['0,0', '0,1', '1,0', '1,1', '1,2']);
    expect([...mdp.startProbability]).toEqual([0.25, 0.25, 0.25, 0, 0.25]);
  });

  test('start weights are normalised over every cell with the character', () => {
    const mdp = compile({
      kind: 'gridworld',
      discount: 0.5,
      layout: ['ab', 'a+'],
      cells: { a: { start: 1 }, b: { start: 2 }, '+': { terminal: true } },
    });
    expect([...mdp.startProbability]).toEqual([0.25, 0.5, 0.25, 0]);
  });

  test('a derived horizon follows the truncation tolerance (docs/methods.md §2: γ=0.9, R=1, ε=0.01 → 66, scripts/methods/truncation.py)', () => {
    const mdp = compile({
      kind: 'gridworld',
      discount: 0.9,
      truncation_tolerance: 0.01,
      layout: ['..+'],
      cells: { '.': {}, '+': { terminal: true, reward: 1 } },
    });
    expect(mdp.horizon).toBe(66);
    expect(mdp.horizonDerived).toBe(true);
  });
});

describe('textbook samples (test/fixtures/textbook-samples)', () => {
  // Figure 3.2 prints one decimal (8.8, 4.4, …); the four-decimal values are the exact solve of
  // scripts/methods/textbook_grids.py, a numpy linear solve written from the book's description.
  test('Sutton & Barto (2018) Example 3.5 grid, uniform policy: Figure 3.2 values to four decimals', async () => {
    const env = await loadEnvironmentFile(`${TEXTBOOK_SAMPLES}grid-5x5-portals.json`);
    const policy = await loadPolicyFile(`${TEXTBOOK_SAMPLES}uniform.json`, env.built);
    if (env.built.kind !== 'finite' || policy.built.kind !== 'matrix') throw new Error('expected finite env and matrix policy');
    const v = evaluatePolicy(env.built.mdp, policy.built.matrix);
    const figure32 = [
      [3.309, 8.7893, 4.4276, 5.3224, 1.4922],
      [1.5216, 2.9923, 2.2501, 1.9076, 0.5474],
      [0.0508, 0.7382, 0.6731, 0.3582, -0.4031],
      [-0.9736, -0.4355, -0.3549, -0.5856, -1.1831],
      [-1.8577, -1.3452, -1.2293, -1.4229, -1.9752],
    ];
    figure32.forEach((row, r) => row.forEach((value, c) => expect(v[r * 5 + c]).toBeCloseTo(value, 4)));
  });

  // The three-decimal utilities printed in Russell & Norvig (2010), AIMA 3rd ed., Fig. 17.3 (from
  // memory); scripts/methods/textbook_grids.py gives the same to within 0.0005 (0.8116, 0.8678, …).
  test('AIMA 4×3 world with the optimal policy of Fig. 17.2: Fig. 17.3 utilities', async () => {
    const env = await loadEnvironmentFile(`${TEXTBOOK_SAMPLES}grid-4x3-slip.json`);
    const policy = await loadPolicyFile(`${TEXTBOOK_SAMPLES}grid-4x3-policy.json`, env.built);
    if (env.built.kind !== 'finite' || policy.built.kind !== 'matrix') throw new Error('expected finite env and matrix policy');
    const mdp = env.built.mdp;
    const v = evaluatePolicy(mdp, policy.built.matrix);
    const figure173: Record<string, number> = {
      '0,0': 0.812, '0,1': 0.868, '0,2': 0.918,
      '1,0': 0.762, '1,2': 0.66,
      '2,0': 0.705, '2,1': 0.655, '2,2': 0.611, '2,3': 0.388,
    };
    for (const [state, value] of Object.entries(figure173)) {
      expect(Math.abs(v[mdp.stateIndex.get(state)!] - value)).toBeLessThan(0.0006);
    }
  });
});
