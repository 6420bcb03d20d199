import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { dkwEpsilon } from '../../src/stats/dkw.js';
import { clopperPearson, episodesForZeroEventBound, wilson } from '../../src/stats/event-probability.js';
import { quantileInterval, wilksConfidence } from '../../src/stats/quantile-interval.js';
import { tailMean, tailMeanEstimate } from '../../src/stats/tail-mean.js';
import { InputError } from '../../src/errors.js';

// Computed by test/fixtures/risk/risk_reference.py from the textbook formulas (standard library
// only: exact binomial sums, bisection for the Clopper–Pearson limits).
const reference = JSON.parse(readFileSync(new URL('../fixtures/risk/risk-reference.json', import.meta.url), 'utf8'));

describe('event probabilities', () => {
  it('Clopper–Pearson with x = 0, n = 3000: one-sided 95% upper 9.980790e-4, about 3/n (rule of three, Hanley & Lippman-Hand 1983), two-sided upper 1.228871e-3', () => {
    expect(clopperPearson(0, 3000, 0.95, true).high).toBeCloseTo(9.98079e-4, 9);
    expect(clopperPearson(0, 3000, 0.95, true).high).toBeCloseTo(3 / 3000, 4);
    expect(clopperPearson(0, 3000, 0.95).high).toBeCloseTo(1.228871e-3, 9);
    expect(clopperPearson(0, 3000, 0.95).high).toBeCloseTo(1 - Math.pow(0.025, 1 / 3000), 12); // closed form at x = 0
  });

  it('Clopper–Pearson and Wilson match the fixture (Clopper & Pearson 1934; Wilson 1927)', () => {
    for (const c of reference.clopper_pearson) {
      const ci = clopperPearson(c.x, c.n, 0.95, c.one_sided);
      expect(ci.low).toBeCloseTo(c.interval[0], 9);
      expect(ci.high).toBeCloseTo(c.interval[1], 9);
    }
    for (const c of reference.wilson) {
      const ci = wilson(c.x, c.n, 0.95);
      expect(ci.low).toBeCloseTo(c.interval[0], 9);
      expect(ci.high).toBeCloseTo(c.interval[1], 9);
    }
    // also SciPy's binomtest(7, 50).proportion_ci(method='wilson') limits (from memory)
    expect(wilson(7, 50, 0.95).low).toBeCloseTo(0.06950833, 8);
    expect(wilson(7, 50, 0.95).high).toBeCloseTo(0.26186194, 8);
  });

  it('2,995 episodes without an event bound p ≤ 10⁻³ at 95% (n = ⌈ln α/ln(1 − p)⌉)', () => {
    expect(episodesForZeroEventBound(1e-3, 0.95)).toBe(reference.zero_event_episodes.episodes);
    expect(episodesForZeroEventBound(1e-3, 0.95)).toBe(2995);
    expect(clopperPearson(0, 2995, 0.95, true).high).toBeLessThanOrEqual(1e-3);
    expect(clopperPearson(0, 2994, 0.95, true).high).toBeGreaterThan(1e-3);
  });

  it('refuses counts outside 0..n', () => {
    expect(() => clopperPearson(5, 3, 0.95)).toThrow(InputError);
  });
});

describe('the DKW band (Dvoretzky, Kiefer & Wolfowitz 1956; Massart 1990)', () => {
  it('ε = √(ln(2/α)/(2n)) = 0.135810 at n = 100, α = 0.05; one-sided 0.122387', () => {
    expect(dkwEpsilon(100, 0.95)).toBeCloseTo(0.13581, 6);
    expect(dkwEpsilon(100, 0.95, true)).toBeCloseTo(0.122387, 6);
    for (const row of reference.dkw) expect(dkwEpsilon(row.n, 0.95)).toBeCloseTo(row.two_sided, 12);
  });
});

describe('quantile intervals from order statistics (Hahn & Meeker 1991, ch. 5)', () => {
  it('the median at n = 20 is (X₍₆₎, X₍₁₅₎) with coverage 0.95861, and the fixture rows agree', () => {
    const sorted = Float64Array.from({ length: 20 }, (_, i) => i + 1);
    const ci = quantileInterval(sorted, 0.5, 0.95, null);
    expect([ci.lowRank, ci.highRank]).toEqual([6, 15]);
    expect([ci.low, ci.high]).toEqual([6, 15]);
    expect(ci.coverage).toBeCloseTo(0.95861, 5);
    for (const row of reference.quantile_ranks) {
      const r = quantileInterval(Float64Array.from({ length: row.n }, (_, i) => i), row.p, 0.95, null);
      expect([r.lowRank, r.highRank], `n = ${row.n}, p = ${row.p}`).toEqual([row.low_rank, row.high_rank]);
      expect(r.coverage).toBeCloseTo(row.coverage, 9);
    }
  });

  it('falls back to the return bound when no order statistic is low enough (n = 20, p = 0.05)', () => {
    const ci = quantileInterval(Float64Array.from({ length: 20 }, (_, i) => i), 0.05, 0.95, [-5, 30]);
    expect(ci.lowRank).toBe(0);
    expect(ci.low).toBe(-5);
    expect(ci.coverage).toBeGreaterThanOrEqual(0.95);
  });

  it("Wilks's one-sided 59-run rule: 1 − 0.95⁵⁹ = 0.95151 (Wilks 1941)", () => {
    expect(wilksConfidence(59, 0.95)).toBeCloseTo(0.95151, 5);
    expect(wilksConfidence(58, 0.95)).toBeLessThan(0.95);
  });
});

describe('the lower-tail mean, CVaR (Rockafellar & Uryasev 2000)', () => {
  it('0.00, 0.01, …, 0.99 at α = 0.1: 0.045, DKW bounds [0, 0.180810] (fixture)', () => {
    const sorted = Float64Array.from({ length: 100 }, (_, i) => i / 100);
    const result = tailMean(sorted, 0.1, 0.95, [0, 1], 1);
    expect(result.estimate).toBeCloseTo(reference.cvar_grid.estimate, 12);
    expect(result.dkw!.low).toBeCloseTo(reference.cvar_grid.dkw[0], 9);
    expect(result.dkw!.high).toBeCloseTo(reference.cvar_grid.dkw[1], 9);
  });

  it('interpolates a fractional tail: the worst 2.5% of 0..99 is (0 + 1 + 0.5·2)/2.5', () => {
    const sorted = Float64Array.from({ length: 100 }, (_, i) => i);
    expect(tailMeanEstimate(sorted, 0.025)).toBeCloseTo((0 + 1 + 0.5 * 2) / 2.5, 12);
  });

  it('the bootstrap interval brackets the estimate on a smooth sample and is reproducible by seed', () => {
    const sorted = Float64Array.from({ length: 4000 }, (_, i) => Math.sqrt(i / 4000));
    const a = tailMean(sorted, 0.05, 0.95, [0, 1], 9);
    const b = tailMean(sorted, 0.05, 0.95, [0, 1], 9);
    expect(a.bootstrap).toEqual(b.bootstrap);
    expect(a.bootstrap!.low).toBeLessThan(a.estimate);
    expect(a.bootstrap!.high).toBeGreaterThan(a.estimate);
    expect(a.dkw!.low).toBeLessThanOrEqual(a.bootstrap!.low);
  });
});
