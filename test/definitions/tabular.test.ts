import { describe, expect, test } from 'vitest';
import type { DefinitionSource } from '../../src/definitions/built.js';
import { parseEnvironment } from '../../src/definitions/parse.js';
import type { TabularDefinition } from '../../src/definitions/schemas.js';
import { compileTabular } from '../../src/definitions/tabular.js';
import { outcomesByName } from './policy-evaluation.js';
import { evaluatePolicy } from './policy-evaluation.js';
import { matrixFromRows } from '../../src/definitions/policy-matrix.js';

const source: DefinitionSource = { label: 'mdp.json', baseDir: '/nowhere' };

describe('compileTabular', () => {
  // Sutton & Barto (2018) Example 6.2 random walk: states A–E, start C, +1 on leaving right,
  // 0 elsewhere; true values under the random policy are 1/6 … 5/6 (the book's
  // values; also scripts/methods/textbook_grids.py).
  const names = ['A', 'B', 'C', 'D', 'E'];
  const transitions = names.flatMap((s, i) => [
    { from: s, action: 'left', to: i === 0 ? 'L' : names[i - 1], p: 1 },
    { from: s, action: 'right', to: i === 4 ? 'R' : names[i + 1], p: 1, reward: i === 4 ? 1 : 0 },
  ]);
  const json = {
    kind: 'tabular',
    discount: 1,
    horizon: 1000,
    states: ['L', ...names, 'R'],
    actions: ['left', 'right'],
    start: { C: 1 },
    terminal: ['L', 'R'],
    transitions,
  };
  const mdp = compileTabular(parseEnvironment(json, source) as TabularDefinition, source);

  test('layout of states, actions, start and terminals follows the file', () => {
    expect(mdp.stateNames).toEqual(['L', 'A', 'B', 'C', 'D', 'E', 'R']);
    expect([...mdp.terminal]).toEqual([1, 0, 0, 0, 0, 0, 1]);
    expect([...mdp.startProbability]).toEqual([0, 0, 0, 1, 0, 0, 0]);
    expect(outcomesByName(mdp, 'E', 'right')).toEqual([['R', 1, 1]]);
    expect(mdp.rewardRange).toEqual([0, 1]);
  });

  test('random-walk values 1/6 … 5/6 (S&B 2018 Example 6.2)', () => {
    const uniform = matrixFromRows(mdp.stateCount, 2, () => new Float64Array([0.5, 0.5]));
    const v = evaluatePolicy(mdp, uniform);
    names.forEach((s, i) => expect(v[mdp.stateIndex.get(s)!]).toBeCloseTo((i + 1) / 6, 9));
  });

  test('duplicate outcomes merge; near-1 sums are normalised; cumulative ends in 1', () => {
    const def = parseEnvironment(
      {
        kind: 'tabular',
        discount: 0.9,
        states: ['s', 't'],
        actions: ['go'],
        transitions: [
          { from: 's', action: 'go', to: 't', p: 0.3, reward: 1 },
          { from: 's', action: 'go', to: 't', p: 0.3, reward: 1 },
          { from: 's', action: 'go', to: 's', p: 0.4 + 5e-10 },
          { from: 't', action: 'go', to: 't', p: 1 },
        ],
      },
      source,
    ) as TabularDefinition;
    const m = compileTabular(def, source);
    const rows = outcomesByName(m, 's', 'go');
    expect(rows.map(([n, , r]) => [n, r])).toEqual([
      ['s', 0],
      ['t', 1],
    ]);
    expect(rows[0][1] + rows[1][1]).toBeCloseTo(1, 15);
    expect(rows[1][1]).toBeCloseTo(0.6, 9);
    expect(m.outcomeCumulative[m.outcomeStart[1] - 1]).toBe(1);
    // no start given: uniform over non-terminal states; no horizon: derived (R = 1, ε = 1e-4 default)
    expect([...m.startProbability]).toEqual([0.5, 0.5]);
    expect(m.horizonDerived).toBe(true);
    expect(m.horizon).toBe(Math.ceil(Math.log(1 / (1e-4 * 0.1)) / Math.log(1 / 0.9)));
  });
});
