import { describe, expect, it } from 'vitest';
import { sortedQuantile } from '../../src/stats/sample-quantile.js';

describe('sortedQuantile (Hyndman & Fan 1996, definition 7)', () => {
  it('matches the NumPy documentation example: percentile of [10,7,4,3,2,1] at 50 is 3.5 (from memory)', () => {
    expect(sortedQuantile(new Float64Array([1, 2, 3, 4, 7, 10]), 0.5)).toBe(3.5);
  });

  it('interpolates linearly between order statistics (hand computation from definition 7)', () => {
    const x = new Float64Array([1, 2, 3, 4, 10]);
    // h = (5 − 1)·0.3 = 1.2 → x(1) + 0.2·(x(2) − x(1)) = 2.2
    expect(sortedQuantile(x, 0.3)).toBeCloseTo(2.2, 14);
    // h = 4·0.9 = 3.6 → 4 + 0.6·6 = 7.6
    expect(sortedQuantile(x, 0.9)).toBeCloseTo(7.6, 14);
    expect(sortedQuantile(x, 0)).toBe(1);
    expect(sortedQuantile(x, 1)).toBe(10);
  });

  it('refuses p outside [0, 1] and empty input', () => {
    expect(() => sortedQuantile(new Float64Array([1]), 1.5)).toThrow(RangeError);
    expect(() => sortedQuantile(new Float64Array(0), 0.5)).toThrow(RangeError);
  });
});
