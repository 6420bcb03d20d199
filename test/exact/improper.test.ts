import { describe, expect, it } from 'vitest';
import { exactEvaluation, infiniteValues } from '../../src/exact/index.js';
import { type MdpSpec, buildMdp, policyFromTable } from './build-mdp.js';

// γ = 1: the undiscounted value exists only where the episode ends with probability 1
// (Kemeny & Snell 1960, absorbing chains). Values below are derived by hand.
//   s0: a0 → s1 (r 0), a1 → s2 (r 2)
//   s1: loops on itself forever (r 1)
//   s2: stays w.p. ½ (r 1), else ends in s3 (r 0): V = ½(1 + V) → V = 1
//   s3: terminal
//   s4: → s2 (r 3): V = 3 + 1 = 4
//   s5: ends w.p. ½ (r 0), else → s1: can reach a terminal, yet not with probability 1
const spec: MdpSpec = {
  stateCount: 6,
  actionCount: 2,
  terminal: [3],
  start: [[0, 1]],
  discount: 1,
  horizon: 50,
  transitions: [
    { from: 0, action: 0, to: 1, p: 1, reward: 0 },
    { from: 0, action: 1, to: 2, p: 1, reward: 2 },
    { from: 1, action: 0, to: 1, p: 1, reward: 1 },
    { from: 1, action: 1, to: 1, p: 1, reward: 1 },
    { from: 2, action: 0, to: 2, p: 0.5, reward: 1 },
    { from: 2, action: 0, to: 3, p: 0.5, reward: 0 },
    { from: 2, action: 1, to: 2, p: 0.5, reward: 1 },
    { from: 2, action: 1, to: 3, p: 0.5, reward: 0 },
    { from: 4, action: 0, to: 2, p: 1, reward: 3 },
    { from: 4, action: 1, to: 2, p: 1, reward: 3 },
    { from: 5, action: 0, to: 3, p: 0.5, reward: 0 },
    { from: 5, action: 0, to: 1, p: 0.5, reward: 0 },
    { from: 5, action: 1, to: 3, p: 0.5, reward: 0 },
    { from: 5, action: 1, to: 1, p: 0.5, reward: 0 },
  ],
};
const half = [0.5, 0.5];

describe('γ = 1 with states that never end', () => {
  it('mixing at s0 makes s0, s1 and s5 NaN; the rest are finite', () => {
    const values = infiniteValues(buildMdp(spec), policyFromTable([half, half, half, half, half, half]));
    expect(Number.isNaN(values[0])).toBe(true);
    expect(Number.isNaN(values[1])).toBe(true);
    expect(Number.isNaN(values[5])).toBe(true);
    expect(values[2]).toBeCloseTo(1, 12);
    expect(values[3]).toBe(0);
    expect(values[4]).toBeCloseTo(4, 12);
  });

  it('value_infinite is null when the start can reach the loop, while the horizon value stays finite', () => {
    const mdp = buildMdp(spec);
    const result = exactEvaluation(mdp, policyFromTable([half, half, half, half, half, half]));
    expect(result.value_infinite).toBeNull();
    // V_50(s0) = ½·(0 + 49) + ½·(2 + (1 − 2^−49)) (the loop earns 1 a step for the 49 steps left).
    expect(result.value).toBeCloseTo(0.5 * 49 + 0.5 * (3 - 2 ** -49), 9);
    expect(exactEvaluation(mdp, policyFromTable([half, half, half, half, half, half]), { start: 4 }).value_infinite).toBeCloseTo(4, 12);
  });

  it('a policy that always leaves s0 through s2 makes s0 finite', () => {
    const values = infiniteValues(buildMdp(spec), policyFromTable([[0, 1], half, half, half, half, half]));
    expect(values[0]).toBeCloseTo(3, 12);
    expect(Number.isNaN(values[1])).toBe(true);
    expect(Number.isNaN(values[5])).toBe(true);
  });

  it('the iterative path finds the same values', () => {
    const policy = policyFromTable([[0, 1], half, half, half, half, half]);
    const dense = infiniteValues(buildMdp(spec), policy);
    const iterative = infiniteValues(buildMdp(spec), policy, { denseLimit: 0 });
    for (let s = 0; s < 6; s++) {
      if (Number.isNaN(dense[s])) expect(Number.isNaN(iterative[s])).toBe(true);
      else expect(iterative[s]).toBeCloseTo(dense[s], 11);
    }
  });

  it('with γ < 1 every state has a value (the loop gives 1/(1 − γ))', () => {
    const values = infiniteValues(buildMdp({ ...spec, discount: 0.9 }), policyFromTable([half, half, half, half, half, half]));
    expect(values[1]).toBeCloseTo(10, 10);
    // s2: V = ½(1 + 0.9V) → V = 0.5/0.55
    expect(values[2]).toBeCloseTo(0.5 / 0.55, 12);
    // s5: ½·0 + ½·(0 + 0.9·10) = 4.5
    expect(values[5]).toBeCloseTo(4.5, 10);
  });
});
