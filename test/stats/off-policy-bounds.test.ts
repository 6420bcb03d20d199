/**
 * The lower bounds against scripts/methods/off_policy.py, which evaluates Thomas, Theocharous &
 * Ghavamzadeh (AAAI 2015) Theorem 1 and the one-sided betting bound of docs/methods.md §13.4 with
 * numpy on fixed samples.
 */
import { describe, expect, it } from 'vitest';
import { heldOutLowerBound, truncatedBernsteinLowerBound } from '../../src/stats/off-policy/high-confidence-lower-bound.js';
import { nonnegativeBettingLowerBound } from '../../src/stats/off-policy/nonnegative-betting-lower-bound.js';

const TEN = [0, 0, 0.35, 0.8, 1.6, 0, 2.9, 0.45, 0.1, 5.2];
const PHI = 0.6180339887498949;
const GOLDEN = Array.from({ length: 1000 }, (_, i) => 4 * ((((i + 1) * PHI) % 1) ** 3));

describe('Thomas, Theocharous & Ghavamzadeh (2015) Theorem 1, one threshold', () => {
  it('the 10-value sample at δ = 0.05 (script: "HCOPE lower bound, 10 values")', () => {
    expect(truncatedBernsteinLowerBound(TEN, 1, 0.95)).toBeCloseTo(-0.86686, 5);
    expect(truncatedBernsteinLowerBound(TEN, 2, 0.95)).toBeCloseTo(-1.896011, 5);
    expect(truncatedBernsteinLowerBound(TEN, 5.2, 0.95)).toBeCloseTo(-5.292762, 5);
  });
  it('x_i = 4((iφ) mod 1)³ at δ = 0.05 (script: "HCOPE c = 2", "c = 4")', () => {
    expect(truncatedBernsteinLowerBound(GOLDEN, 2, 0.95)).toBeCloseTo(0.724374, 5);
    expect(truncatedBernsteinLowerBound(GOLDEN, 4, 0.95)).toBeCloseTo(0.868072, 5);
  });
  it('with a held-out threshold, stays below the mean and is reproducible', () => {
    const a = heldOutLowerBound(GOLDEN, 0.95, 7);
    expect(a.lowerBound).toBeLessThan(0.999981);
    expect(a.heldOut).toBe(50);
    expect(heldOutLowerBound(GOLDEN, 0.95, 7)).toEqual(a);
  });
});

describe('one-sided betting lower bound for X ≥ 0', () => {
  it('x_i = 4((iφ) mod 1)³, α = 0.05, c = 1/2 (script: "one-sided betting lower bound" 0.917851)', () => {
    expect(nonnegativeBettingLowerBound(GOLDEN, 0.95)).toBeCloseTo(0.917851, 5);
  });
  it('is 0 when nothing can be excluded, and refuses negative values', () => {
    expect(nonnegativeBettingLowerBound([0, 0, 0], 0.95)).toBe(0);
    expect(() => nonnegativeBettingLowerBound([1, -1], 0.95)).toThrow(RangeError);
  });
});
