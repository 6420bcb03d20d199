import { describe, expect, it } from 'vitest';
import { moduleReturnBounds, returnBounds } from '../../src/exact/index.js';
import { type MdpSpec, buildMdp, policyFromTable } from './build-mdp.js';

// Every episode of this MDP enumerated by hand (γ = ½, H = 3, start s0):
//   s0 a1 → ends with 5                                  G = 5
//   s0 a0 → s1 (1), then s1 loops (1, 1)                 G = 1 + ½ + ¼ = 1.75
//   s0 a0 → s2 (−2), s2 a0 → ends (0)                    G = −2
//   s0 a0 → s2 (−2), s2 a1 → s0 (0), then one step:
//        a1 → 5: G = −2 + ¼·5 = −0.75;  a0 → s1: −2 + ¼ = −1.75;  a0 → s2: −2 − ½ = −2.5
const spec: MdpSpec = {
  stateCount: 4,
  actionCount: 2,
  terminal: [3],
  start: [[0, 1]],
  discount: 0.5,
  horizon: 3,
  transitions: [
    { from: 0, action: 0, to: 1, p: 0.5, reward: 1 },
    { from: 0, action: 0, to: 2, p: 0.5, reward: -2 },
    { from: 0, action: 1, to: 3, p: 1, reward: 5 },
    { from: 1, action: 0, to: 1, p: 1, reward: 1 },
    { from: 1, action: 1, to: 1, p: 1, reward: 1 },
    { from: 2, action: 0, to: 3, p: 1, reward: 0 },
    { from: 2, action: 1, to: 0, p: 1, reward: 0 },
  ],
};
const half = [0.5, 0.5];

describe('returnBounds (hand enumeration)', () => {
  const mdp = buildMdp(spec);

  it('over all actions', () => {
    expect(returnBounds(mdp, null)).toEqual([-2.5, 5]);
  });

  it('over the actions a policy can take', () => {
    expect(returnBounds(mdp, policyFromTable([[1, 0], half, half, half]))).toEqual([-2.5, 1.75]);
    expect(returnBounds(mdp, policyFromTable([[1, 0], half, [1, 0], half]))).toEqual([-2, 1.75]);
  });

  it('from a given start, and from a terminal start', () => {
    expect(returnBounds(mdp, null, 1)).toEqual([1.75, 1.75]);
    expect(returnBounds(mdp, null, 3)).toEqual([0, 0]);
  });

  it('a shorter horizon', () => {
    expect(returnBounds(buildMdp({ ...spec, horizon: 1 }), null)).toEqual([-2, 5]);
  });

  it('over the start support', () => {
    const spread = buildMdp({ ...spec, start: [[1, 0.5], [2, 0.5]] });
    // s1: 1.75; s2: a0 → 0, a1 → s0 then two steps: −0 + ½·(5) = 2.5, ½·(1 + ½) = 0.75, ½·(−2 + 0) = −1
    expect(returnBounds(spread, null)).toEqual([-1, 2.5]);
  });
});

describe('moduleReturnBounds (geometric series, derived by hand)', () => {
  it('mixed-sign rewards scale both ends', () => {
    expect(moduleReturnBounds([-1, 2], 0.5, 3)).toEqual([-1.75, 3.5]);
  });
  it('non-negative rewards: one step is the least', () => {
    expect(moduleReturnBounds([1, 2], 0.5, 3)).toEqual([1, 3.5]);
  });
  it('non-positive rewards: one step is the most', () => {
    expect(moduleReturnBounds([-2, -1], 0.5, 3)).toEqual([-3.5, -1]);
  });
  it('undiscounted', () => {
    expect(moduleReturnBounds([-1, 1], 1, 10)).toEqual([-10, 10]);
  });
});
