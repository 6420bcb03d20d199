import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { comparePolicies } from '../../src/stats/compare-policies.js';
import { holmAdjust } from '../../src/stats/holm.js';
import { interquartileMean } from '../../src/stats/interquartile-mean.js';
import { interquartileMeanInterval } from '../../src/stats/interquartile-mean-interval.js';
import { comparePair } from '../../src/stats/paired-comparison.js';
import { pairedDifferences } from '../../src/stats/paired-differences.js';
import { pairedTTest } from '../../src/stats/paired-t-test.js';
import { pairingGain } from '../../src/stats/pairing-gain.js';
import { rankByMean } from '../../src/stats/policy-ranking.js';
import { probabilityOfImprovement, probabilityOfImprovementInterval } from '../../src/stats/probability-of-improvement.js';
import { summarize } from '../../src/stats/summary.js';
import { tInterval } from '../../src/stats/t-interval.js';
import { normalSample } from './samples.js';

/** SciPy reference values; generator: fixtures/compare-scipy.py. */
const scipy = JSON.parse(readFileSync(new URL('./fixtures/compare-scipy.json', import.meta.url), 'utf8'));

// Student's sleep data (Cushny & Peebles 1905, as analysed by Student 1908): extra hours of
// sleep under two drugs for the same 10 patients. Values and R's paired t.test output
// (t = 4.0621, df = 9, p = 0.002833, 95% CI 0.7001 to 2.4599 for drug 2 − drug 1) from memory.
const drugOne = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
const drugTwo = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];

describe('paired t', () => {
  it("reproduces the sleep-data paired t test (Student 1908; R's t.test output, from memory)", () => {
    const result = pairedTTest(pairedDifferences(drugTwo, drugOne), 0.95);
    expect(result.differences.mean).toBeCloseTo(1.58, 12);
    expect(result.tStatistic).toBeCloseTo(4.0621, 4);
    expect(result.degreesOfFreedom).toBe(9);
    expect(result.pValue).toBeCloseTo(0.002833, 6);
    expect(result.interval.low).toBeCloseTo(0.7001, 4);
    expect(result.interval.high).toBeCloseTo(2.4599, 4);
  });

  it('matches SciPy ttest_rel on tied returns (fixture compare-scipy.json)', () => {
    const { first, second, t, p, low, high } = scipy.paired;
    const result = comparePair(first, second, { level: 0.95 });
    expect(result.tStatistic).toBeCloseTo(t, 10);
    expect(result.pValue).toBeCloseTo(p, 10);
    expect(result.interval.low).toBeCloseTo(low, 10);
    expect(result.interval.high).toBeCloseTo(high, 10);
  });

  it('is the one-sample t on the differences (definition of the paired t: Student 1908; NIST/SEMATECH e-Handbook 1.3.5.3)', () => {
    const a = normalSample(50, 1, 3, 2);
    const b = normalSample(50, 2, 2.5, 2);
    const d = pairedDifferences(a, b);
    const oneSample = tInterval(summarize(d), 0.9);
    const paired = comparePair(a, b, { level: 0.9 });
    expect(paired.interval).toEqual(oneSample);
    expect(paired.meanDifference).toBeCloseTo(paired.meanFirst - paired.meanSecond, 12);
    // swapping the policies flips the sign and keeps the p-value
    const swapped = comparePair(b, a, { level: 0.9 });
    expect(swapped.tStatistic).toBeCloseTo(-paired.tStatistic, 12);
    expect(swapped.pValue).toBeCloseTo(paired.pValue, 12);
  });

  it('offers a bootstrap of the paired differences, close to t for normal differences (common practice)', () => {
    const base = normalSample(400, 5);
    const a = base.map((x, i) => x + 0.2 + 0.3 * normalSample(400, 6)[i]);
    const t = comparePair(a, base, { level: 0.95 });
    const boot = comparePair(a, base, { level: 0.95, method: 'bootstrap-percentile', seed: 3 });
    expect(boot.interval.method).toBe('bootstrap-percentile');
    expect(Math.abs(boot.interval.low - t.interval.low)).toBeLessThan(0.15 * t.interval.halfWidth);
    expect(Math.abs(boot.interval.high - t.interval.high)).toBeLessThan(0.15 * t.interval.halfWidth);
    expect(comparePair(a, base, { level: 0.95, method: 'bootstrap', seed: 3 }).interval.method).toBe('bootstrap');
  });

  it('refuses unpaired samples with a one-line InputError', () => {
    expect(() => comparePair([1, 2, 3], [1, 2], { level: 0.95 })).toThrow(InputError);
  });
});

describe('pairing gain', () => {
  it('correlation matches SciPy pearsonr (fixture compare-scipy.json)', () => {
    const { first, second, pearson } = scipy.paired;
    expect(pairingGain(first, second).correlation).toBeCloseTo(pearson, 12);
  });

  it('variance reduction is (Var A + Var B)/Var(A − B), with Var(A − B) = Var A + Var B − 2 Cov (variance of a difference; common practice)', () => {
    const base = normalSample(1000, 11);
    const noise = normalSample(1000, 12);
    const a = base;
    const b = base.map((x, i) => x + 0.5 * noise[i]);
    const gain = pairingGain(a, b);
    const va = summarize(a).variance;
    const vb = summarize(b).variance;
    const vd = summarize(pairedDifferences(a, b)).variance;
    expect(gain.varianceDifference).toBeCloseTo(vd, 10);
    expect(gain.varianceReduction).toBeCloseTo((va + vb) / vd, 8);
    const cov = (gain.correlation * Math.sqrt(va * vb));
    expect(vd).toBeCloseTo(va + vb - 2 * cov, 8);
    // population values: Var A = 1, Var B = 1.25, Var(A − B) = 0.25 → 9× (loose: sampling error)
    expect(gain.varianceReduction).toBeGreaterThan(7.5);
    expect(gain.varianceReduction).toBeLessThan(10.5);
  });

  it('independent samples gain nothing: the factor is near 1 (common practice)', () => {
    const gain = pairingGain(normalSample(4000, 21), normalSample(4000, 22));
    expect(Math.abs(gain.correlation)).toBeLessThan(0.05);
    expect(gain.varianceReduction).toBeGreaterThan(0.9);
    expect(gain.varianceReduction).toBeLessThan(1.1);
  });
});

describe('Holm adjusted p-values', () => {
  it('stdlib-js padjust documented example: [0.319, 0.201, 0.4, 0.374, 0.113] → [~0.957, 0.804, …, ~0.957, ~0.565] (@stdlib/stats-padjust README)', () => {
    const adjusted = holmAdjust([0.319, 0.201, 0.4, 0.374, 0.113]);
    expect(adjusted[0]).toBeCloseTo(0.957, 12);
    expect(adjusted[1]).toBeCloseTo(0.804, 12);
    expect(adjusted[3]).toBeCloseTo(0.957, 12);
    expect(adjusted[4]).toBeCloseTo(0.565, 12);
  });

  it('pingouin holm documented example: [.50, .003, .32, .054, .0003] → [0.64, 0.012, 0.64, 0.162, 0.0015] (pingouin docs)', () => {
    const adjusted = holmAdjust([0.5, 0.003, 0.32, 0.054, 0.0003]);
    [0.64, 0.012, 0.64, 0.162, 0.0015].forEach((e, i) => expect(adjusted[i]).toBeCloseTo(e, 12));
  });

  it('four hypotheses p = 0.01, 0.04, 0.03, 0.005 → 0.03, 0.06, 0.06, 0.02 (Holm–Bonferroni worked example, from memory)', () => {
    const adjusted = holmAdjust([0.01, 0.04, 0.03, 0.005]);
    [0.03, 0.06, 0.06, 0.02].forEach((e, i) => expect(adjusted[i]).toBeCloseTo(e, 12));
  });

  it('caps at 1 and leaves a single p-value alone (Holm 1979 with m = 1)', () => {
    expect(holmAdjust([0.6, 0.7])).toEqual([1, 1]);
    expect(holmAdjust([0.042])).toEqual([0.042]);
  });
});

describe('probability of improvement', () => {
  /** Direct double loop over all pairs, ties ½ (Mann & Whitney 1947; common practice). */
  function directCount(x: number[], y: number[]): number {
    let s = 0;
    for (const a of x) for (const b of y) s += a > b ? 1 : a === b ? 0.5 : 0;
    return s / (x.length * y.length);
  }

  it('equals a direct count with ties on small samples (Mann–Whitney U/(NK); common practice)', () => {
    const x = [3, 1, 4, 1, 5, 9, 2, 6];
    const y = [2, 7, 1, 8, 2, 8, 1];
    expect(probabilityOfImprovement(x, y)).toBeCloseTo(directCount(x, y), 15);
    expect(probabilityOfImprovement([1, 1, 1], [1, 1])).toBe(0.5);
    expect(probabilityOfImprovement([2], [1, 1, 3])).toBeCloseTo(2 / 3, 15);
  });

  it('matches SciPy mannwhitneyu U/(NK) on tied returns (fixture compare-scipy.json)', () => {
    const { first, second, u_first } = scipy.paired;
    expect(probabilityOfImprovement(first, second)).toBeCloseTo(u_first / (first.length * second.length), 14);
  });

  it('tortoise-and-hare order THHHHHTTTTTH gives U_T = 11 of 36 (Mann–Whitney worked example, from memory)', () => {
    const order = 'THHHHHTTTTTH';
    const score = (who: string) => [...order].flatMap((c, i) => (c === who ? [-i] : [])); // earlier finish = higher score
    expect(probabilityOfImprovement(score('T'), score('H')) * 36).toBeCloseTo(11, 12);
    expect(probabilityOfImprovement(score('H'), score('T')) * 36).toBeCloseTo(25, 12);
  });

  it('interval contains the estimate, is reproducible, and the paired variance is smaller under positive correlation (common practice)', () => {
    const base = normalSample(300, 31);
    const noise = normalSample(300, 32);
    const x = base.map((v, i) => v + 0.1 + 0.3 * noise[i]);
    const paired = probabilityOfImprovementInterval(x, base, 0.95);
    const again = probabilityOfImprovementInterval(x, base, 0.95);
    const independent = probabilityOfImprovementInterval(x, base, 0.95, { resampling: 'independent' });
    expect(again).toEqual(paired);
    expect(paired.interval.low).toBeLessThan(paired.estimate);
    expect(paired.interval.high).toBeGreaterThan(paired.estimate);
    expect(paired.estimate).toBeCloseTo(probabilityOfImprovement(x, base), 15);
    expect(independent.estimate).toBe(paired.estimate);
    expect(paired.interval.halfWidth).toBeLessThan(independent.interval.halfWidth);
  });

  it('every x above every y gives P = 1 with no spread in the placements, so the interval is [1, 1] (definition)', () => {
    const r = probabilityOfImprovementInterval([2, 2, 2], [1, 1, 1], 0.9);
    expect(r.interval.low).toBe(1);
    expect(r.interval.high).toBe(1);
  });
});

describe('interquartile mean', () => {
  it('equals SciPy trim_mean(x, 0.25) (fixture compare-scipy.json)', () => {
    expect(interquartileMean(scipy.trim.values)).toBeCloseTo(scipy.trim.trim_mean_25, 12);
  });

  it('is the mean of the middle half: 1..8 → mean of 3..6 = 4.5 (definition, Agarwal et al. 2021)', () => {
    expect(interquartileMean([8, 1, 7, 2, 6, 3, 5, 4])).toBe(4.5);
    expect(interquartileMean([1, 2, 3, 4, 1000])).toBe(3); // ⌊5/4⌋ = 1 cut from each end
  });

  it('stratified bootstrap keeps stratum sizes: two constant strata give a degenerate interval (Agarwal et al. 2021)', () => {
    const r = interquartileMeanInterval([[1, 1, 1, 1], [5, 5, 5, 5]], 0.95, { resamples: 200 });
    expect(r.estimate).toBe(3);
    expect(r.interval.low).toBe(3);
    expect(r.interval.high).toBe(3);
    // without stratification the pooled resamples would vary; one stratum does
    const pooled = interquartileMeanInterval([[1, 1, 1, 1, 5, 5, 5, 5]], 0.95, { resamples: 200 });
    expect(pooled.interval.high - pooled.interval.low).toBeGreaterThan(1);
  });
});

describe('ranking and the k-policy comparison', () => {
  it('ranks by mean with competition ranking (common practice)', () => {
    expect(rankByMean([1, 3, 2, 3])).toEqual({ order: [1, 3, 2, 0], rank: [4, 1, 3, 1] });
  });

  it('three policies: every pair, Holm over the three p-values, PoI and IQM on request', () => {
    const base = normalSample(200, 41);
    const noise = normalSample(200, 42);
    const a = base;
    const b = base.map((x, i) => x + 0.3 + 0.2 * noise[i]);
    const c = base.map((x, i) => x - 0.05 + 0.2 * noise[i]);
    const result = comparePolicies([a, b, c], { level: 0.95, seed: 1, resamples: 300, interquartileMean: true });
    expect(result.pairs.map((p) => [p.first, p.second])).toEqual([[0, 1], [0, 2], [1, 2]]);
    expect(result.pairs.map((p) => p.adjustedPValue)).toEqual(holmAdjust(result.pairs.map((p) => p.pValue)));
    expect(result.policies.map((p) => p.rank)).toEqual([2, 1, 3]);
    const ab = result.pairs[0];
    expect(ab.meanDifference).toBeLessThan(0);
    expect(ab.adjustedPValue).toBeLessThan(1e-6);
    expect(ab.probabilityOfImprovement.estimate).toBeCloseTo(probabilityOfImprovement(a, b), 15);
    expect(ab.varianceReduction).toBeGreaterThan(10);
    expect(result.policies[0].interquartileMean?.estimate).toBeCloseTo(interquartileMean(a), 15);
    expect(() => comparePolicies([a], { level: 0.95 })).toThrow(InputError);
  });
});
