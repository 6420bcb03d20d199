import { describe, expect, it } from 'vitest';
import { horizonValues, infiniteValues } from '../../src/exact/index.js';
import { buildMdp } from './build-mdp.js';
import { randomCase, referenceValues } from './random-mdps.js';

// Reference: ml-matrix (npm, general-purpose linear algebra) solving (I − γP_π)V = r_π, with
// P_π and r_π assembled in the test from the raw transition list (Puterman 1994, Thm 6.1.1,
// from memory; docs/methods.md §9).

const discounts = [0.5, 0.9, 0.99];
const cases = Array.from({ length: 21 }, (_, i) => ({ seed: 1000 + i, discount: discounts[i % 3] }));

function maxDifference(x: Float64Array, y: Float64Array): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i] - y[i]));
  return m;
}

describe('infiniteValues against ml-matrix', () => {
  it.each(cases)('seed $seed, γ = $discount: dense and iterative solves match', ({ seed, discount }) => {
    const c = randomCase(seed, discount);
    const mdp = buildMdp(c.spec);
    const expected = referenceValues(c);
    expect(maxDifference(infiniteValues(mdp, c.policy), expected)).toBeLessThan(1e-9);
    expect(maxDifference(infiniteValues(mdp, c.policy, { denseLimit: 0 }), expected)).toBeLessThan(1e-9);
  });

  // γ = 1 with an exit from every pair: an absorbing chain, (I − Q)V = r (Kemeny & Snell 1960).
  it.each(cases.slice(0, 8))('seed $seed, γ = 1, every state can end: matches', ({ seed }) => {
    const c = randomCase(seed, 1, true);
    const mdp = buildMdp(c.spec);
    const expected = referenceValues(c);
    expect(maxDifference(infiniteValues(mdp, c.policy), expected)).toBeLessThan(1e-9);
    expect(maxDifference(infiniteValues(mdp, c.policy, { denseLimit: 0 }), expected)).toBeLessThan(1e-9);
  });
});

describe('horizonValues with γ^H negligible', () => {
  it.each(cases)('seed $seed, γ = $discount: V_H matches the infinite-horizon solve', ({ seed, discount }) => {
    // |V − V_H| ≤ γ^H max|r|/(1 − γ) (docs/methods.md §2, eq. 2.1): H = 5000 puts it below 1e-19 for γ = 0.99.
    const c = randomCase(seed, discount);
    const mdp = buildMdp({ ...c.spec, horizon: 5000 });
    const { value } = horizonValues(mdp, c.policy);
    expect(maxDifference(value, referenceValues(c))).toBeLessThan(1e-9);
  });

  it('a short horizon is far from the infinite value (the check can fail)', () => {
    const c = randomCase(1002, 0.99);
    const mdp = buildMdp({ ...c.spec, horizon: 5 });
    expect(maxDifference(horizonValues(mdp, c.policy).value, referenceValues(c))).toBeGreaterThan(1e-3);
  });
});
