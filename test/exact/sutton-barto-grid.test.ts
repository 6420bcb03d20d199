import { describe, expect, it } from 'vitest';
import { exactEvaluation, horizonValues } from '../../src/exact/index.js';
import { type TransitionSpec, buildMdp, uniformPolicy } from './build-mdp.js';

// Sutton & Barto 2018, Example 4.1 / Figure 4.1: 4×4 grid, the two shaded corners terminal,
// reward −1 on every transition, moves off the grid leave the state unchanged, γ = 1,
// equiprobable random policy. v_π from the book (from memory; recomputed as exact integers by
// scripts/methods/textbook_grids.py, which also gives the sweeps below to four decimals).
const expectedInfinite = [
  [0, -14, -20, -22],
  [-14, -18, -20, -20],
  [-20, -20, -18, -14],
  [-22, -20, -14, 0],
];
// The left column of Figure 4.1: synchronous sweeps v_k from v_0 = 0, which are exactly the
// horizon-k values; printed to one decimal (from memory), so the tolerance is 0.051.
const expectedSweeps: Record<number, number[][]> = {
  1: [
    [0, -1, -1, -1],
    [-1, -1, -1, -1],
    [-1, -1, -1, -1],
    [-1, -1, -1, 0],
  ],
  2: [
    [0, -1.7, -2.0, -2.0],
    [-1.7, -2.0, -2.0, -2.0],
    [-2.0, -2.0, -2.0, -1.7],
    [-2.0, -2.0, -1.7, 0],
  ],
  3: [
    [0, -2.4, -2.9, -3.0],
    [-2.4, -2.9, -3.0, -2.9],
    [-2.9, -3.0, -2.9, -2.4],
    [-3.0, -2.9, -2.4, 0],
  ],
  10: [
    [0, -6.1, -8.4, -9.0],
    [-6.1, -7.7, -8.4, -8.4],
    [-8.4, -8.4, -7.7, -6.1],
    [-9.0, -8.4, -6.1, 0],
  ],
};

/** The grid built by hand: state = 4·row + column; actions up, down, right, left. */
function gridMdp(horizon: number) {
  const moves = [
    [-1, 0],
    [1, 0],
    [0, 1],
    [0, -1],
  ];
  const terminal = [0, 15];
  const transitions: TransitionSpec[] = [];
  for (let s = 0; s < 16; s++) {
    if (terminal.includes(s)) continue;
    const row = Math.floor(s / 4);
    const col = s % 4;
    moves.forEach(([dr, dc], action) => {
      const r = row + dr;
      const c = col + dc;
      const to = r < 0 || r > 3 || c < 0 || c > 3 ? s : 4 * r + c;
      transitions.push({ from: s, action, to, p: 1, reward: -1 });
    });
  }
  const live = Array.from({ length: 16 }, (_, s) => s).filter((s) => !terminal.includes(s));
  return buildMdp({
    stateCount: 16,
    actionCount: 4,
    transitions,
    terminal,
    start: live.map((s) => [s, 1 / live.length] as const),
    discount: 1,
    horizon,
  });
}

describe('Sutton & Barto Example 4.1 gridworld', () => {
  const policy = uniformPolicy(16, 4);

  it('value_infinite per state is the book table', () => {
    const result = exactEvaluation(gridMdp(10), policy);
    expectedInfinite.flat().forEach((v, s) => expect(result.states_infinite[s]).toBeCloseTo(v, 6));
    // Uniform start over the 14 non-terminal cells: the table's sum over 14.
    const total = expectedInfinite.flat().reduce((x, y) => x + y, 0);
    expect(result.value_infinite).toBeCloseTo(total / 14, 6);
  });

  it.each([1, 2, 3, 10])('horizon %i equals sweep k of Figure 4.1', (k) => {
    const { value } = horizonValues(gridMdp(k), policy);
    expectedSweeps[k].flat().forEach((v, s) => expect(Math.abs(value[s] - v)).toBeLessThanOrEqual(0.051));
  });

  it('horizon values approach the book table for a large horizon', () => {
    const { value } = horizonValues(gridMdp(2000), policy);
    expectedInfinite.flat().forEach((v, s) => expect(value[s]).toBeCloseTo(v, 6));
  });
});
