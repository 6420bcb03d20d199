import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { summarize } from '../../src/stats/summary.js';
import { welchComparison } from '../../src/stats/welch.js';

/**
 * Welch's interval and test against SciPy's `scipy.stats.ttest_ind(a, b, equal_var=False)`
 * (statistic, p-value, degrees of freedom and `confidence_interval`), from the fixture that
 * test/fixtures/welch/make-welch.py writes.
 */
interface Case {
  name: string;
  a: number[];
  b: number[];
  level: number;
  statistic: number;
  p_value: number;
  df: number;
  low: number;
  high: number;
}
const fixture = JSON.parse(readFileSync(path.join(__dirname, '../fixtures/welch/welch.json'), 'utf8')) as { cases: Case[] };

function close(actual: number, expected: number, relative: number, what: string) {
  const difference = Math.abs(actual - expected);
  const tolerance = relative * Math.max(1, Math.abs(expected));
  expect(difference, `${what}: got ${actual}, SciPy ${expected}, difference ${difference}, tolerance ${tolerance}`).toBeLessThanOrEqual(tolerance);
}

describe('Welch interval and test', () => {
  it.each(fixture.cases.map((c) => [c.name, c] as const))('%s: equals SciPy', (_name, c) => {
    const result = welchComparison(summarize(c.a), summarize(c.b), c.level);
    close(result.tStatistic, c.statistic, 1e-10, 'statistic');
    close(result.degreesOfFreedom, c.df, 1e-10, 'degrees of freedom');
    close(result.low, c.low, 1e-10, 'low');
    close(result.high, c.high, 1e-10, 'high');
    // p-values as small as 1e-6: relative to the value itself
    expect(Math.abs(result.pValue - c.p_value) / c.p_value, `p-value ${result.pValue} against ${c.p_value}`).toBeLessThan(1e-8);
  });

  it('refuses a sample of one return', () => {
    expect(() => welchComparison({ n: 1, mean: 0, variance: Number.NaN }, { n: 5, mean: 0, variance: 1 }, 0.95)).toThrow(RangeError);
  });
});
