import { describe, expect, it } from 'vitest';
import { normalCdf, normalQuantile, tQuantile } from '../../src/stats/quantiles.js';

// NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.2 "Critical values of the
// Student's t distribution", printed to 3 decimals; tolerance is half a unit of the last digit.
const HALF_UNIT_3DP = 0.0005;
const NIST_T: Array<[df: number, t975: number, t995: number]> = [
  [1, 12.706, 63.657],
  [2, 4.303, 9.925],
  [5, 2.571, 4.032],
  [10, 2.228, 3.169],
  [30, 2.042, 2.75],
  [100, 1.984, 2.626],
];

describe('tQuantile', () => {
  it.each(NIST_T)('df %d matches NIST 1.3.6.7.2 at 0.975 and 0.995', (df, t975, t995) => {
    expect(Math.abs(tQuantile(0.975, df) - t975)).toBeLessThanOrEqual(HALF_UNIT_3DP);
    expect(Math.abs(tQuantile(0.995, df) - t995)).toBeLessThanOrEqual(HALF_UNIT_3DP);
  });

  it('is symmetric: t(1 − p) = −t(p) (property of the t distribution)', () => {
    expect(tQuantile(0.025, 10)).toBeCloseTo(-tQuantile(0.975, 10), 12);
  });

  it('uses the normal quantile at df = ∞ (NIST 1.3.6.7.2, ∞ row: 1.960, 2.576)', () => {
    expect(tQuantile(0.975, Infinity)).toBe(normalQuantile(0.975));
    expect(Math.abs(tQuantile(0.995, Infinity) - 2.576)).toBeLessThanOrEqual(HALF_UNIT_3DP);
  });

  it('accepts fractional df, lying between its integer neighbours (t quantiles fall as df grows: common practice)', () => {
    const t = tQuantile(0.975, 2.5);
    expect(t).toBeLessThan(tQuantile(0.975, 2));
    expect(t).toBeGreaterThan(tQuantile(0.975, 3));
  });

  it('refuses df below 1', () => {
    expect(() => tQuantile(0.975, 0.5)).toThrow(RangeError);
    expect(() => tQuantile(0.975, Number.NaN)).toThrow(RangeError);
  });
});

describe('normalQuantile', () => {
  // NIST/SEMATECH e-Handbook 1.3.6.7.2, ∞ row, prints 1.960 and 2.576; the six-decimal values
  // 1.959964 and 2.575829 are Python's statistics.NormalDist (scripts/methods/fixed_n_intervals.py).
  it('matches z(0.975) = 1.959964 and z(0.995) = 2.575829 to half a unit of the 6th decimal', () => {
    expect(Math.abs(normalQuantile(0.975) - 1.959964)).toBeLessThanOrEqual(5e-7);
    expect(Math.abs(normalQuantile(0.995) - 2.575829)).toBeLessThanOrEqual(5e-7);
  });
});

describe('normalCdf', () => {
  // NIST/SEMATECH e-Handbook 1.3.6.7.1, table of Φ(z) − 0.5 to 5 decimals (from memory).
  it.each([
    [1.0, 0.34134],
    [1.96, 0.475],
    [2.0, 0.47725],
    [3.0, 0.49865],
  ])('Φ(%d) − 0.5 matches NIST 1.3.6.7.1', (z, area) => {
    expect(Math.abs(normalCdf(z) - 0.5 - area)).toBeLessThanOrEqual(5e-6);
  });

  it('inverts normalQuantile (definition of a quantile)', () => {
    for (const p of [0.001, 0.025, 0.5, 0.9, 0.999]) expect(normalCdf(normalQuantile(p))).toBeCloseTo(p, 12);
  });
});
