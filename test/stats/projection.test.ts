import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { bernsteinHalfWidth } from '../../src/stats/bernstein.js';
import {
  defaultTargets,
  episodesNeeded,
  projectionRuleFor,
  projectionTable,
} from '../../src/stats/projection.js';
import type { ReturnSummary } from '../../src/stats/summary.js';

function summaryWith(n: number, std: number, min = -1e9, max = 1e9): ReturnSummary {
  return { n, mean: 0, std, variance: std * std, stderr: std / Math.sqrt(n), min, max };
}

describe('episodesNeeded', () => {
  const pilot = summaryWith(20, 1);

  it('z rule: s = 1, ε = 0.1, 95% → 385 (⌈(1.959964·10)²⌉, z from NIST/SEMATECH 1.3.6.7.2; scripts/methods/projections.py)', () => {
    expect(episodesNeeded('normal', pilot, 0.1, 0.95)).toBe(385);
  });

  it('t rule: s = 1, ε = 0.1, 95% → 387 (smallest n with t(0.975; n−1)/√n ≤ 0.1, scripts/methods/projections.py)', () => {
    expect(episodesNeeded('t', pilot, 0.1, 0.95)).toBe(387);
  });

  it('t rule with few episodes: s = 1, ε = 1 → 7, the first n with t(0.975; n−1)/√n ≤ 1 (NIST 1.3.6.7.2: 2.447/√7 = 0.925, 2.571/√6 = 1.050)', () => {
    expect(episodesNeeded('t', pilot, 1, 0.95)).toBe(7);
  });

  it('t rule where the iteration cycles: s = 1, ε = 2 → 4 (NIST 1.3.6.7.2: 3.182/√4 = 1.591 ≤ 2 < 4.303/√3 = 2.484)', () => {
    expect(episodesNeeded('t', pilot, 2, 0.95)).toBe(4);
  });

  it('Hoeffding: b − a = 1, δ = 0.05, ε = 0.01 → 18,445 (Hoeffding 1963 Thm 2; scripts/methods/projections.py)', () => {
    expect(episodesNeeded('hoeffding', summaryWith(20, 0.3, 0, 1), 0.01, 0.95, [0, 1])).toBe(18445);
  });

  it('Bernstein: with s² = 0.1 on [0,1], the half-width 0.039839 at n = 1000 (scripts/methods/fixed_n_intervals.py) is first reached at n = 1000 (Maurer & Pontil 2009 Thm 4)', () => {
    const target = 0.03984; // half-width(999) ≈ 0.039864 > target ≥ half-width(1000) ≈ 0.039839
    expect(bernsteinHalfWidth(999, 0.1, 1, 0.05)).toBeGreaterThan(target);
    const s = summaryWith(20, Math.sqrt(0.1), 0, 1);
    expect(episodesNeeded('bernstein', s, target, 0.95, [0, 1])).toBe(1000);
  });

  it('bootstrap methods scale the current half-width by the 1/√n law (common practice)', () => {
    const s = summaryWith(100, 1);
    expect(episodesNeeded('bootstrap', s, 0.1, 0.95, null, 0.2)).toBe(400);
    expect(episodesNeeded('bootstrap-percentile', s, 0.05, 0.95, null, 0.2)).toBe(1600);
    expect(projectionRuleFor('bootstrap')).toBe('inverse-sqrt-n');
    expect(() => episodesNeeded('bootstrap', s, 0.1, 0.95)).toThrow(RangeError);
  });

  it('answers the current n (at least 2) when all returns are equal, instead of dividing by zero', () => {
    expect(episodesNeeded('t', summaryWith(30, 0), 0.01, 0.95)).toBe(30);
    expect(episodesNeeded('normal', summaryWith(1, 0), 0.01, 0.95)).toBe(2);
    expect(episodesNeeded('bootstrap', summaryWith(30, 0), 0.01, 0.95, null, 0)).toBe(30);
  });

  it('refuses a non-positive target and missing bounds', () => {
    expect(() => episodesNeeded('t', pilot, 0, 0.95)).toThrow(InputError);
    expect(() => episodesNeeded('hoeffding', pilot, 0.1, 0.95)).toThrow(/--ci hoeffding: needs return bounds/);
  });
});

describe('projectionTable', () => {
  it('lists needed and further episodes, and seconds at a known rate (snake_case JSON keys)', () => {
    const rows = projectionTable({
      method: 't',
      summary: summaryWith(100, 1),
      level: 0.95,
      currentHalfWidth: 0.2,
      targets: [0.1, 0.5],
      episodesPerSecond: 287,
    });
    expect(rows).toEqual([
      { half_width: 0.1, episodes_needed: 387, more_episodes: 287, seconds: 1 },
      { half_width: 0.5, episodes_needed: expect.any(Number), more_episodes: 0, seconds: 0 },
    ]);
  });

  it('uses the current half-width /2, /5, /10 by default and null seconds without a rate', () => {
    expect(defaultTargets(1)).toEqual([0.5, 0.2, 0.1]);
    const rows = projectionTable({ method: 'bootstrap', summary: summaryWith(50, 1), level: 0.95, currentHalfWidth: 1 });
    // 1/√n law: halving needs 4n, a fifth 25n, a tenth 100n.
    expect(rows.map((r) => r.episodes_needed)).toEqual([200, 1250, 5000]);
    expect(rows.map((r) => r.more_episodes)).toEqual([150, 1200, 4950]);
    expect(rows.every((r) => r.seconds === null)).toBe(true);
  });

  it('has no default targets when the interval already has zero width', () => {
    expect(projectionTable({ method: 't', summary: summaryWith(10, 0), level: 0.95, currentHalfWidth: 0 })).toEqual([]);
  });
});
