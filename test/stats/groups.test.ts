import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { interquartileMean } from '../../src/stats/interquartile-mean.js';
import { probabilityOfImprovement } from '../../src/stats/probability-of-improvement.js';
import {
  compareGroups,
  episodesPerMember,
  groupMean,
  seedsForHalfWidth,
  seedsForPower,
  sharedEpisodeCovariance,
  twoSampleTestPower,
  varianceComponents,
  welchDifference,
} from '../../src/stats/groups/index.js';
import { InputError } from '../../src/errors.js';

/** SciPy / NumPy reference values; generator: fixtures/groups-scipy.py. */
const ref = JSON.parse(readFileSync(new URL('./fixtures/groups-scipy.json', import.meta.url), 'utf8'));
const Y: number[][] = ref.anova.y;

/** Members whose means are `means`: two episodes each at mean ± 1 (only the means matter to Welch). */
const membersWithMeans = (means: number[]) => means.map((m) => [m - 1, m + 1]);

describe('two-level ANOVA of 3 seeds × 4 episodes (one-way random effects, Cochran 1977 ch. 10; recomputed by fixtures/groups-scipy.py)', () => {
  const c = varianceComponents(Y);
  it('grand mean, MSB, MSW, σ̂²_b, ICC and design effect', () => {
    expect(c.grandMean).toBeCloseTo(ref.anova.grand_mean, 12); // 2.666667
    expect(c.meanSquareBetween).toBeCloseTo(ref.anova.msb, 12); // 5.333333
    expect(c.meanSquareWithin).toBeCloseTo(ref.anova.msw, 12); // 0.666667
    expect(c.betweenVariance).toBeCloseTo(ref.anova.sigma_b2, 12); // 1.166667
    expect(c.intraclassCorrelation).toBeCloseTo(ref.anova.icc, 12); // 0.636364
    expect(c.designEffect).toBeCloseTo(ref.anova.design_effect, 12);
    // F = MSB/MSW against SciPy f_oneway.
    expect(c.meanSquareBetween! / c.meanSquareWithin).toBeCloseTo(ref.anova.f_oneway, 10);
  });
  it('random-effects SE 0.666667, t₂ half-width 2.868435, naive SE 0.355335', () => {
    const g = groupMean(Y, { level: 0.95 });
    expect(g.standardError).toBeCloseTo(ref.anova.se_random_effects, 12);
    expect(g.interval.halfWidth).toBeCloseTo(ref.anova.t_half_width, 9);
    expect(g.interval.method).toBe('seed-t');
    expect(g.interval.degreesOfFreedom).toBe(2);
    expect(g.naiveStandardError).toBeCloseTo(ref.anova.se_naive, 12);
    // The check values as printed in the notes, to six places.
    expect(g.interval.halfWidth).toBeCloseTo(2.868435, 6);
    expect(g.naiveStandardError).toBeCloseTo(0.355335, 6);
  });
  it('the unequal-n form agrees with the balanced one on balanced data, and stays unbiased when n_k differ (common practice: E s²(Ȳ_k) = σ²_b + mean σ²_w/n_k)', () => {
    const unequal = varianceComponents([[1, 2, 3, 2, 2, 2], [4, 5, 3, 4], [2, 3]]);
    expect(unequal.meanSquareBetween).toBeNull();
    const means = [2, 4, 2.5];
    const mean = means.reduce((a, b) => a + b) / 3;
    const s2 = means.reduce((s, m) => s + (m - mean) ** 2, 0) / 2;
    const episodePart = (0.4 / 6 + (2 / 3) / 4 + 0.5 / 2) / 3;
    expect(unequal.betweenVariance).toBeCloseTo(s2 - episodePart, 12);
  });
});

describe('statistics over members (Agarwal et al. 2021)', () => {
  it('IQM of the eight scores is 0.475 (SciPy trim_mean(x, 0.25))', () => {
    expect(interquartileMean(ref.x)).toBeCloseTo(ref.trim_mean_25, 12);
    expect(ref.trim_mean_25).toBeCloseTo(0.475, 12);
    const members = membersWithMeans(ref.x);
    expect(groupMean(members, { level: 0.95 }).interquartileMean.estimate).toBeCloseTo(0.475, 12);
  });
  it('P(X > Y) = 0.507812 (SciPy mannwhitneyu U / 64), and the group comparison reports it over member means', () => {
    expect(probabilityOfImprovement(ref.x, ref.y)).toBeCloseTo(ref.mann_whitney_u_over_mn, 12);
    expect(ref.mann_whitney_u_over_mn).toBeCloseTo(0.507812, 6);
    const members = [...membersWithMeans(ref.x), ...membersWithMeans(ref.y)];
    const groups = [
      { name: 'x', members: [0, 1, 2, 3, 4, 5, 6, 7] },
      { name: 'y', members: [8, 9, 10, 11, 12, 13, 14, 15] },
    ];
    const result = compareGroups(members, groups, { level: 0.95, sharedEpisodes: false });
    expect(result.pairs[0].probabilityOfImprovement.estimate).toBeCloseTo(0.5078125, 12);
  });
  it("Welch's interval and p-value on member means match SciPy ttest_ind(equal_var=False)", () => {
    const a = varianceComponents(membersWithMeans(ref.x));
    const b = varianceComponents(membersWithMeans(ref.y));
    const d = welchDifference(a, b, 0.95);
    expect(d.tStatistic).toBeCloseTo(ref.welch.t, 10);
    expect(d.degreesOfFreedom).toBeCloseTo(ref.welch.df, 9);
    expect(d.pValue).toBeCloseTo(ref.welch.p, 9);
    expect(d.interval.low).toBeCloseTo(ref.welch.low, 9);
    expect(d.interval.high).toBeCloseTo(ref.welch.high, 9);
  });
  it('Holm adjusts the p-values across three groups (Holm 1979: smallest × 3)', () => {
    const members = [...membersWithMeans([0, 0.1, 0.2]), ...membersWithMeans([1, 1.1, 1.3]), ...membersWithMeans([0.05, 0.2, 0.1])];
    const groups = [0, 1, 2].map((g) => ({ name: `g${g}`, members: [3 * g, 3 * g + 1, 3 * g + 2] }));
    const r = compareGroups(members, groups, { level: 0.95, sharedEpisodes: false });
    const ps = r.pairs.map((p) => p.pValue);
    const smallest = Math.min(...ps);
    expect(r.pairs.find((p) => p.pValue === smallest)!.adjustedPValue).toBeCloseTo(Math.min(1, 3 * smallest), 12);
  });
  it('refuses a group of one member, naming it', () => {
    expect(() => compareGroups([[1, 2], [3, 4]], [{ name: 'solo', members: [0] }], { level: 0.95 })).toThrow(InputError);
    expect(() => compareGroups([[1, 2], [3, 4]], [{ name: 'solo', members: [0] }], { level: 0.95 })).toThrow(/--group solo: needs at least 2 members/);
  });
});

describe('planning seeds and episodes', () => {
  it('seeds per group for d = 0.5 / 1 / 2 at α = 0.05, power 0.8: 64 / 17 / 6 (SciPy nct)', () => {
    for (const row of ref.seeds_for_power) {
      const r = seedsForPower(row.d, 0.95, 0.8);
      expect(r.seeds).toBe(row.seeds);
      expect(r.power).toBeCloseTo(row.power, 6);
      expect(twoSampleTestPower(row.seeds - 1, row.d, 0.95)).toBeLessThan(0.8);
    }
  });
  it('n* = √((c_seed/c_episode)·σ²_w/σ²_b): 158, 50, 32 for the classic cases (two-stage optimum; recomputed by scripts/methods/policy_groups.py)', () => {
    expect(episodesPerMember(1000, 1, 0.25, 0.01)).toBe(158);
    expect(episodesPerMember(100, 1, 0.25, 0.01)).toBe(50);
    expect(episodesPerMember(1000, 1, 0.09, 0.09)).toBe(32);
    expect(episodesPerMember(1000, 1, 0.09, 0)).toBe(Infinity);
  });
  it('seeds for a half-width: the smallest K with t_{K−1}·√((σ²_b + σ²_w/n)/K) ≤ E (t quantiles: NIST/SEMATECH 1.3.6.7.2)', () => {
    // σ²_b + σ²_w/n = 0.01 + 0.25/100 = 0.0125. K = 7: t₆ = 2.447 gives 0.1034; K = 8: t₇ = 2.365 gives 0.0935.
    expect(seedsForHalfWidth(0.1, 0.01, 0.25, 100, 0.95)).toBe(8);
    expect(2.447 * Math.sqrt(0.0125 / 7)).toBeGreaterThan(0.1);
    expect(2.365 * Math.sqrt(0.0125 / 8)).toBeLessThan(0.1);
  });
});

describe('shared episode noise under common random numbers (docs/methods.md §15.3)', () => {
  it('c̄ equals the mean off-diagonal covariance of episode means, computed pair by pair', () => {
    const members = [
      [1, 3, 2, 5, 4],
      [2, 3, 1, 6, 5],
      [0, 4, 2, 4, 3],
    ];
    const cov = (x: number[], y: number[]) => {
      const mx = x.reduce((a, b) => a + b) / x.length;
      const my = y.reduce((a, b) => a + b) / y.length;
      return x.reduce((s, v, i) => s + (v - mx) * (y[i] - my), 0) / (x.length - 1);
    };
    const pairs = [cov(members[0], members[1]), cov(members[0], members[2]), cov(members[1], members[2])];
    expect(sharedEpisodeCovariance(members)).toBeCloseTo(pairs.reduce((a, b) => a + b) / 3 / 5, 12);
  });
});

describe('the seed-level bootstrap from 20 members (Davison & Hinkley 1997, §3.8)', () => {
  // 25 members with means spread like a normal sample, two episodes each at mean ± 1.
  const normalScores = Array.from({ length: 25 }, (_, i) => {
    // Blom's approximate normal scores (common practice) give a fixed, symmetric spread.
    const p = (i + 1 - 0.375) / (25 + 0.25);
    const t = Math.sqrt(-2 * Math.log(Math.min(p, 1 - p)));
    const z = t - (2.515517 + 0.802853 * t + 0.010328 * t * t) / (1 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t ** 3);
    return p < 0.5 ? -z : z;
  });
  const members = membersWithMeans(normalScores.map((z) => 10 + 0.3 * z));
  it('is reported from K = 20 on, and its width matches the resampling-seeds expectation E var* = ((K − 1)/K)·s²(Ȳ_k)/K', () => {
    const g = groupMean(members, { level: 0.95, seed: 3 });
    expect(g.seedBootstrap).not.toBeNull();
    const k = 25;
    const expected = 1.959964 * Math.sqrt(((k - 1) / k) * (g.components.varianceOfMemberMeans / k));
    // 2000 resamples: the percentile half-width is within a few percent of its expectation.
    expect(g.seedBootstrap!.halfWidth / expected).toBeGreaterThan(0.9);
    expect(g.seedBootstrap!.halfWidth / expected).toBeLessThan(1.1);
    expect(groupMean(members.slice(0, 19), { level: 0.95 }).seedBootstrap).toBeNull();
  });
});
