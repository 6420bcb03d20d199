import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { summarize } from '../../src/stats/summary.js';

/** NIST StRD univariate sets NumAcc2–4: a, then 500 pairs (a − 0.1, a + 0.1); n = 1001. */
function numAcc(centre: number, below: number, above: number): Float64Array {
  const x = new Float64Array(1001);
  x[0] = centre;
  for (let i = 1; i < 1001; i += 2) {
    x[i] = below;
    x[i + 1] = above;
  }
  return x;
}

describe('summarize against NIST Statistical Reference Datasets (univariate; certified values from memory)', () => {
  it('NumAcc1 {10000001, 10000003, 10000002}: mean 10000002, sd 1', () => {
    const s = summarize([10000001, 10000003, 10000002]);
    expect(s.mean).toBe(10000002);
    expect(s.std).toBeCloseTo(1, 12);
  });

  it.each([
    ['NumAcc2', 1.2, 1.1, 1.3],
    ['NumAcc3', 1000000.2, 1000000.1, 1000000.3],
    ['NumAcc4', 10000000.2, 10000000.1, 10000000.3],
  ])('%s: mean as certified, sd 0.1 to 7 significant digits', (_name, centre, below, above) => {
    const s = summarize(numAcc(centre, below, above));
    expect(s.n).toBe(1001);
    expect(Math.abs(s.mean - centre) / centre).toBeLessThan(1e-14);
    // A one-pass Σx² − n x̄² loses every digit on NumAcc4; the corrected two-pass keeps ~8.
    expect(Math.abs(s.std - 0.1) / 0.1).toBeLessThan(1e-7);
  });
});

describe('summarize', () => {
  it('gives the textbook quantities for a small sample (hand computation: {2,4,4,4,5,5,7,9})', () => {
    // Mean 5, Σ(x − x̄)² = 32, so s² = 32/7; a standard worked example (common practice).
    const s = summarize([2, 4, 4, 4, 5, 5, 7, 9]);
    expect(s).toMatchObject({ n: 8, mean: 5, min: 2, max: 9 });
    expect(s.variance).toBeCloseTo(32 / 7, 14);
    expect(s.std).toBeCloseTo(Math.sqrt(32 / 7), 14);
    expect(s.stderr).toBeCloseTo(Math.sqrt(32 / 7) / Math.sqrt(8), 14);
  });

  it('reads only the first `count` entries of a larger buffer', () => {
    const buffer = new Float64Array([1, 2, 3, 1e9, 1e9]);
    expect(summarize(buffer, 3)).toMatchObject({ n: 3, mean: 2, variance: 1, max: 3 });
  });

  it('reports zero spread, not NaN, for a single return', () => {
    expect(summarize([4.5])).toMatchObject({ n: 1, mean: 4.5, std: 0, variance: 0, stderr: 0 });
  });

  it('refuses an empty sample and non-finite returns with InputError', () => {
    expect(() => summarize([])).toThrow(InputError);
    expect(() => summarize([1, Number.NaN])).toThrow(/episode 1/);
    expect(() => summarize([1, 2], 3)).toThrow(RangeError);
  });
});
