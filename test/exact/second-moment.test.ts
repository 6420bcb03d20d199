import { describe, expect, it } from 'vitest';
import { exactEvaluation, horizonValues } from '../../src/exact/index.js';
import { type MdpSpec, buildMdp, policyFromTable } from './build-mdp.js';

// Reference: brute-force enumeration of every trajectory of at most H steps with its
// probability (common practice), straight from the transition list. The recursion under test
// is M_h = Σ π Σ p [r² + 2γ r V_{h−1} + γ² M_{h−1}] (docs/methods.md §9).

// Three live states and one terminal; s1 reaches s2 with two different rewards, so the
// reward–continuation cross term matters.
const spec: MdpSpec = {
  stateCount: 4,
  actionCount: 2,
  terminal: [3],
  start: [
    [0, 0.6],
    [1, 0.3],
    [3, 0.1],
  ],
  discount: 0.9,
  horizon: 4,
  transitions: [
    { from: 0, action: 0, to: 1, p: 0.5, reward: 1 },
    { from: 0, action: 0, to: 2, p: 0.5, reward: -2 },
    { from: 0, action: 1, to: 0, p: 0.8, reward: 0.5 },
    { from: 0, action: 1, to: 3, p: 0.2, reward: 4 },
    { from: 1, action: 0, to: 2, p: 0.25, reward: 3 },
    { from: 1, action: 0, to: 2, p: 0.25, reward: -1 },
    { from: 1, action: 0, to: 0, p: 0.5, reward: 0 },
    { from: 1, action: 1, to: 3, p: 1, reward: 2 },
    { from: 2, action: 0, to: 1, p: 0.7, reward: -0.5 },
    { from: 2, action: 0, to: 3, p: 0.3, reward: 1.5 },
    { from: 2, action: 1, to: 2, p: 1, reward: 1 },
  ],
};
const table = [
  [0.3, 0.7],
  [1, 0],
  [0.5, 0.5],
  [0.5, 0.5],
];

/** Σ prob·G and Σ prob·G² over all trajectories of at most `steps` rewards from s. */
function enumerate(s: number, steps: number): { mean: number; second: number; mass: number } {
  let mean = 0;
  let second = 0;
  let mass = 0;
  const walk = (state: number, left: number, prob: number, g: number, weight: number): void => {
    if (left === 0 || spec.terminal!.includes(state)) {
      mean += prob * g;
      second += prob * g * g;
      mass += prob;
      return;
    }
    for (const t of spec.transitions) {
      const pi = table[state][t.action];
      if (t.from !== state || pi === 0) continue;
      walk(t.to, left - 1, prob * pi * t.p, g + weight * t.reward, weight * spec.discount);
    }
  };
  walk(s, steps, 1, 0, 1);
  return { mean, second, mass };
}

describe('horizon-H value and second moment against trajectory enumeration', () => {
  it.each([1, 2, 3, 4])('H = %i', (h) => {
    const mdp = buildMdp(spec);
    const result = horizonValues(mdp, policyFromTable(table), h);
    for (let s = 0; s < 4; s++) {
      const brute = enumerate(s, h);
      expect(brute.mass).toBeCloseTo(1, 12);
      expect(result.value[s]).toBeCloseTo(brute.mean, 12);
      expect(result.secondMoment[s]).toBeCloseTo(brute.second, 12);
    }
  });

  it.each([1, 2, 3, 4])('H = %i: exactEvaluation mean and std over the start distribution', (h) => {
    const mdp = buildMdp({ ...spec, horizon: h });
    const result = exactEvaluation(mdp, policyFromTable(table));
    let mean = 0;
    let second = 0;
    for (const [s, w] of spec.start) {
      const brute = enumerate(s, h);
      mean += w * brute.mean;
      second += w * brute.second;
    }
    expect(result.value).toBeCloseTo(mean, 12);
    expect(result.std).toBeCloseTo(Math.sqrt(second - mean * mean), 12);
    expect(result.horizon).toBe(h);
    expect(result.discount).toBe(0.9);
  });

  it('a terminal start has value 0 and std 0', () => {
    const result = exactEvaluation(buildMdp(spec), policyFromTable(table), { start: 3 });
    expect(result.value).toBe(0);
    expect(result.std).toBe(0);
    expect(result.value_infinite).toBe(0);
  });

  it('start picks one state', () => {
    const result = exactEvaluation(buildMdp(spec), policyFromTable(table), { start: 1 });
    const brute = enumerate(1, 4);
    expect(result.value).toBeCloseTo(brute.mean, 12);
    expect(result.std).toBeCloseTo(Math.sqrt(brute.second - brute.mean ** 2), 12);
  });

  it('rejects a start outside the state range', () => {
    expect(() => exactEvaluation(buildMdp(spec), policyFromTable(table), { start: 4 })).toThrow(/start/);
  });
});
