import { readFileSync } from 'node:fs';
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { EmpiricalBernsteinSequence, episodesNeededEmpiricalBernstein } from '../../src/stats/empirical-bernstein-sequence.js';
import { planEpisodes } from '../../src/stats/episode-plan.js';
import { noncentralTCdf } from '../../src/stats/noncentral-t-cdf.js';
import { episodesNeededNormalMixture, normalMixtureHalfWidth } from '../../src/stats/normal-mixture-sequence.js';
import { pairedSampleSize, pairedTestPower } from '../../src/stats/paired-sample-size.js';
import type { ReturnSummary } from '../../src/stats/summary.js';

/** SciPy reference values; generator: fixtures/compare-scipy.py. */
const scipy = JSON.parse(readFileSync(new URL('./fixtures/compare-scipy.json', import.meta.url), 'utf8'));

describe('noncentral t CDF', () => {
  it('matches SciPy stats.nct.cdf to 1e-9 (fixture compare-scipy.json)', () => {
    for (const { t, df, ncp, cdf } of scipy.nct) {
      const got = noncentralTCdf(t, df, ncp);
      expect(Math.abs(got - cdf), `t=${t} df=${df} ncp=${ncp}: got ${got}, SciPy ${cdf}`).toBeLessThan(1e-9);
    }
  });

  it('with ncp = 0 is the central t CDF of @stdlib/stats-base-dists-t-cdf', () => {
    for (const df of [1, 2, 5, 17, 250]) {
      for (const t of [-4, -1.3, 0, 0.7, 2.5, 9]) expect(noncentralTCdf(t, df, 0)).toBeCloseTo(tCdf(t, df), 10);
    }
  });

  it('refuses df below 1', () => {
    expect(() => noncentralTCdf(1, 0.5, 1)).toThrow(RangeError);
  });
});

describe('paired-comparison sample size', () => {
  it('δ = 0.1, σ_D = 0.5, power 0.8 at 95%: 197 (z), 199 (t), power 0.8017 at 199 (scripts/methods/projections.py)', () => {
    const plan = pairedSampleSize({ effect: 0.1, sigmaDifference: 0.5 });
    expect(plan.zPairs).toBe(197);
    expect(plan.tPairs).toBe(199);
    expect(plan.powerAtTPairs).toBeCloseTo(0.8017, 4);
    expect(plan.exactPairs).toBe(199); // power 0.7997 at 198, 0.8017 at 199 (scripts/methods/projections.py)
  });

  it('power is α at δ → 0 and grows with n (definition of power)', () => {
    expect(pairedTestPower(30, 1e-9, 1, 0.95)).toBeCloseTo(0.05, 6);
    expect(pairedTestPower(50, 0.3, 1, 0.95)).toBeLessThan(pairedTestPower(100, 0.3, 1, 0.95));
  });

  it('refuses a zero effect with a one-line InputError', () => {
    expect(() => pairedSampleSize({ effect: 0, sigmaDifference: 1 })).toThrow(InputError);
  });
});

describe('episodes for a confidence-sequence run', () => {
  it('normal mixture: with ρ tuned to the answer, σ = 1 and ε = 0.095979 need t = 1000 (closed form, eq. 6.3 of docs/methods.md; scripts/methods/normal_mixture.py)', () => {
    const plan = episodesNeededNormalMixture({ epsilon: 0.095979, sigma: 1, level: 0.95 });
    expect(plan.episodes).toBe(1000);
    expect(plan.rho).toBeCloseTo(121.77, 1);
  });

  it('normal mixture with ρ given: the smallest t meeting ε (definition)', () => {
    const { episodes } = episodesNeededNormalMixture({ epsilon: 0.05, sigma: 1, level: 0.95, rho: 121.77 });
    expect(normalMixtureHalfWidth(episodes, 1, 0.95, 121.77)).toBeLessThanOrEqual(0.05);
    expect(normalMixtureHalfWidth(episodes - 1, 1, 0.95, 121.77)).toBeGreaterThan(0.05);
  });

  it('empirical Bernstein: Bernoulli(0.02) at ε = 0.01 plans about the median stop of a simulation (scripts/methods/optional_stopping.py: 2450)', () => {
    const planned = episodesNeededEmpiricalBernstein({ epsilon: 0.01, variance: 0.02 * 0.98, bounds: [0, 1], level: 0.95 });
    expect(planned).toBeGreaterThan(2450 * 0.9);
    expect(planned).toBeLessThan(2450 * 1.1);
  });

  it('empirical Bernstein: the planned path reaches ε on data whose variance is the plugged-in one (alternating 0, 1 has σ² = 1/4)', () => {
    const planned = episodesNeededEmpiricalBernstein({ epsilon: 0.1, variance: 0.25, bounds: [0, 1], level: 0.95 });
    const sequence = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [0, 1], intersect: false });
    sequence.add(Float64Array.from({ length: planned }, (_, i) => i % 2));
    expect(Math.abs(sequence.interval().halfWidth - 0.1)).toBeLessThan(0.005);
  });

  it('plan from a pilot: fixed-n t, both sequences, and Hoeffding n = 18,445 for b − a = 1, δ = 0.05, ε = 0.01 (Hoeffding 1963; scripts/methods/projections.py)', () => {
    const pilot: ReturnSummary = { n: 100, mean: 0.3, std: 0.3, variance: 0.09, stderr: 0.03, min: 0, max: 1 };
    const plan = planEpisodes({ pilot, epsilon: 0.01, level: 0.95, bounds: [0, 1] });
    expect(plan.hoeffding).toBe(18445);
    expect(plan.normalMixture.sigmaSource).toBe('bounds');
    expect(plan.normalMixture.sigma).toBe(0.5);
    // the t projection: start at ⌈(1.96·0.3/0.01)²⌉ = 3458 and refine with t quantiles to 3460
    // (docs/methods.md §5; scripts/methods/projections.py)
    expect(plan.fixedT).toBe(3460);
    // anytime validity costs episodes: both sequences need more than the fixed-n t run
    expect(plan.empiricalBernstein!).toBeGreaterThan(plan.fixedT);
    expect(plan.normalMixture.episodes).toBeGreaterThan(plan.fixedT);
    const unbounded = planEpisodes({ pilot, epsilon: 0.01, level: 0.95 });
    expect(unbounded).toMatchObject({ empiricalBernstein: null, hoeffding: null });
    expect(unbounded.normalMixture).toMatchObject({ sigma: 0.3, sigmaSource: 'estimated' });
  });
});
