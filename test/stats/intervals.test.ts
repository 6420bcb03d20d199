import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { bernsteinHalfWidth } from '../../src/stats/bernstein.js';
import { hoeffdingHalfWidth } from '../../src/stats/hoeffding.js';
import { CI_METHODS, confidenceInterval } from '../../src/stats/intervals.js';
import { summarize, type ReturnSummary } from '../../src/stats/summary.js';
import { normalSample } from './samples.js';

/** A summary with chosen n, mean and stderr, for checking interval formulas against tables. */
function summaryWith(n: number, mean: number, stderr: number): ReturnSummary {
  const std = stderr * Math.sqrt(n);
  return { n, mean, std, variance: std * std, stderr, min: mean - 10 * std, max: mean + 10 * std };
}

describe('t and normal intervals', () => {
  it('t half-width with stderr 1 and n = 11 is t(0.975; 10) = 2.228 (NIST e-Handbook 1.3.6.7.2)', () => {
    const ci = confidenceInterval([], summaryWith(11, 3, 1), { method: 't', level: 0.95 });
    expect(Math.abs(ci.halfWidth - 2.228)).toBeLessThanOrEqual(0.0005);
    expect(ci.low).toBeCloseTo(3 - ci.halfWidth, 12);
    expect(ci.high).toBeCloseTo(3 + ci.halfWidth, 12);
    expect(ci).toMatchObject({ method: 't', level: 0.95 });
  });

  it('t half-width at 99% with n = 31 is t(0.995; 30) = 2.750 (NIST e-Handbook 1.3.6.7.2)', () => {
    const ci = confidenceInterval([], summaryWith(31, 0, 1), { method: 't', level: 0.99 });
    expect(Math.abs(ci.halfWidth - 2.75)).toBeLessThanOrEqual(0.0005);
  });

  it('normal half-width with stderr 1 is z(0.975) = 1.959964 (NIST e-Handbook 1.3.6.7.2, ∞ row, prints 1.960; six decimals from scripts/methods/fixed_n_intervals.py)', () => {
    const ci = confidenceInterval([], summaryWith(50, -2, 1), { method: 'normal', level: 0.95 });
    expect(Math.abs(ci.halfWidth - 1.959964)).toBeLessThanOrEqual(5e-7);
    expect(ci.method).toBe('normal');
  });

  it('covers the true mean at about the stated rate (coverage of the t interval: common practice)', () => {
    // 400 normal samples of 10; 95% t intervals should miss about 20 times (binomial sd ≈ 4.4).
    let misses = 0;
    for (let seed = 0; seed < 400; seed++) {
      const x = normalSample(10, seed, 5, 2);
      const ci = confidenceInterval(x, summarize(x), { method: 't', level: 0.95 });
      if (ci.low > 5 || ci.high < 5) misses++;
    }
    expect(misses).toBeGreaterThanOrEqual(7);
    expect(misses).toBeLessThanOrEqual(33);
  });
});

describe('Hoeffding and empirical Bernstein', () => {
  it('Hoeffding half-width, n = 1000, b − a = 1, δ = 0.05, is 0.042947 (Hoeffding 1963 Thm 2; scripts/methods/fixed_n_intervals.py)', () => {
    expect(hoeffdingHalfWidth(1000, 1, 0.05)).toBeCloseTo(0.042947, 6);
  });

  it('Bernstein half-width, n = 1000, s² = 0.1, δ = 0.05 on [0,1], is 0.039839 (Maurer & Pontil 2009 Thm 4, two-sided; scripts/methods/fixed_n_intervals.py)', () => {
    expect(bernsteinHalfWidth(1000, 0.1, 1, 0.05)).toBeCloseTo(0.039839, 6);
  });

  it('scales Bernstein to [a, b]: the bound is the [0,1] bound of the rescaled returns times b − a (Maurer & Pontil 2009, by linearity)', () => {
    const range = 40;
    const s2 = 0.1 * range * range;
    expect(bernsteinHalfWidth(1000, s2, range, 0.05)).toBeCloseTo(0.039839 * range, 4);
  });

  it('the dispatcher uses those half-widths at level 0.95 when the interval stays inside the bounds', () => {
    const x = normalSample(1000, 3, 0.5, 0.05);
    const summary = summarize(x);
    const h = confidenceInterval(x, summary, { method: 'hoeffding', level: 0.95, bounds: [0, 1] });
    expect(h.halfWidth).toBeCloseTo(0.042947, 6);
    const b = confidenceInterval(x, summary, { method: 'bernstein', level: 0.95, bounds: [0, 1] });
    expect(b.halfWidth).toBeCloseTo(bernsteinHalfWidth(1000, summary.variance, 1, 0.05), 12);
    expect(b.low).toBeCloseTo(summary.mean - b.halfWidth, 12);
  });

  it('intersects the interval with [a, b] (μ lies there for certain)', () => {
    const x = [0.99, 1, 1, 0.98, 1];
    const ci = confidenceInterval(x, summarize(x), { method: 'hoeffding', level: 0.95, bounds: [0, 1] });
    expect(ci.high).toBe(1);
    expect(ci.halfWidth).toBeCloseTo((ci.high - ci.low) / 2, 14);
  });
});

describe('bad input', () => {
  const x = [1, 2, 3];
  const summary = summarize(x);

  it.each(['hoeffding', 'bernstein'] as const)('%s without bounds throws InputError naming --ci and --bounds', (method) => {
    const call = () => confidenceInterval(x, summary, { method, level: 0.95 });
    expect(call).toThrow(InputError);
    expect(call).toThrow(
      `--ci ${method}: needs return bounds: give --bounds LOW,HIGH (none are known for this environment)`,
    );
    expect(() => confidenceInterval(x, summary, { method, level: 0.95, bounds: null })).toThrow(InputError);
  });

  it('refuses bounds that the returns break, or LOW ≥ HIGH', () => {
    expect(() => confidenceInterval(x, summary, { method: 'hoeffding', level: 0.95, bounds: [0, 2.5] })).toThrow(/--bounds/);
    expect(() => confidenceInterval(x, summary, { method: 'bernstein', level: 0.95, bounds: [3, 1] })).toThrow(/--bounds/);
  });

  it.each(CI_METHODS)('%s refuses a single episode with InputError', (method) => {
    const one = [0.5];
    const call = () => confidenceInterval(one, summarize(one), { method, level: 0.95, bounds: [0, 1] });
    expect(call).toThrow(InputError);
    expect(call).toThrow(/at least 2 episodes/);
  });

  it('refuses levels outside (0, 1) and unknown methods', () => {
    expect(() => confidenceInterval(x, summary, { method: 't', level: 95 })).toThrow(/--level/);
    expect(() => confidenceInterval(x, summary, { method: 't', level: 0 })).toThrow(InputError);
    expect(() => confidenceInterval(x, summary, { method: 'jackknife' as 't', level: 0.95 })).toThrow(/--ci: unknown method/);
  });
});
