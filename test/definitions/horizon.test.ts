import { describe, expect, test } from 'vitest';
import { InputError } from '../../src/errors.js';
import { horizonForTolerance, resolveHorizon, truncationBound } from '../../src/definitions/horizon.js';

describe('ε-horizon (Kearns, Mansour & Ng 2002, from memory; check values of docs/methods.md §2, scripts/methods/truncation.py)', () => {
  test('γ = 0.99, R = 1, ε = 0.01 → 917', () => {
    expect(horizonForTolerance(0.99, 1, 0.01)).toBe(917);
  });

  test('γ = 0.9, R = 1, ε = 0.01 → 66', () => {
    expect(horizonForTolerance(0.9, 1, 0.01)).toBe(66);
  });

  test('the horizon is the smallest meeting the bound γ^H·R/(1−γ) ≤ ε', () => {
    for (const [g, r, eps] of [
      [0.99, 1, 0.01],
      [0.9, 1, 0.01],
      [0.95, 3.5, 1e-4],
      [0.5, 10, 1e-6],
    ]) {
      const h = horizonForTolerance(g, r, eps);
      expect(truncationBound(g, h, r)!).toBeLessThanOrEqual(eps);
      if (h > 1) expect(truncationBound(g, h - 1, r)!).toBeGreaterThan(eps);
    }
  });

  test('R = 0 needs one step; a bound already met at H = 1 gives 1', () => {
    expect(horizonForTolerance(0.9, 0, 1e-4)).toBe(1);
    expect(horizonForTolerance(0.5, 0.001, 0.01)).toBe(1);
  });
});

describe('truncationBound', () => {
  test('γ^H·R/(1−γ); null without discounting', () => {
    expect(truncationBound(0.9, 66, 1)!).toBeCloseTo(Math.pow(0.9, 66) / 0.1, 15);
    expect(truncationBound(1, 100, 1)).toBeNull();
  });
});

describe('resolveHorizon', () => {
  test('a given horizon is kept', () => {
    expect(resolveHorizon(0.9, 12, 1, 1e-4, 'env.json')).toEqual({ horizon: 12, horizonDerived: false });
  });

  test('an omitted horizon is derived and marked', () => {
    expect(resolveHorizon(0.99, undefined, 1, 0.01, 'env.json')).toEqual({ horizon: 917, horizonDerived: true });
  });

  test('discount 1 without a horizon is an input error naming the place', () => {
    expect(() => resolveHorizon(1, undefined, 1, 1e-4, 'env.json')).toThrow(InputError);
    expect(() => resolveHorizon(1, undefined, 1, 1e-4, 'env.json')).toThrow('env.json: horizon is required when discount is 1');
  });

  test('a discount so close to 1 that the horizon would be absurd asks for one', () => {
    expect(() => resolveHorizon(1 - 1e-12, undefined, 1, 1e-4, 'env.json')).toThrow('give "horizon"');
  });
});
