import { describe, expect, it } from 'vitest';
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import exponentialCdf from '@stdlib/stats-base-dists-exponential-cdf';
import gammaCdf from '@stdlib/stats-base-dists-gamma-cdf';
import betaCdf from '@stdlib/stats-base-dists-beta-cdf';
import poissonCdf from '@stdlib/stats-base-dists-poisson-cdf';
import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import geometricPmf from '@stdlib/stats-base-dists-geometric-pmf';
import { EpisodeRng } from '../../src/engine/episode-rng.js';
import { STREAM, seedStream } from '../../src/engine/streams.js';

/**
 * The named distributions of a plug-in's rng, each checked against its distribution from
 * outside the project:
 * - mean and variance of 10^6 draws against the textbook formulas, within five standard
 *   errors (common practice). Formulas for mean, variance and excess kurtosis as tabulated in
 *   Forbes, Evans, Hastings & Peacock, "Statistical Distributions" (4th ed., Wiley 2011), from
 *   memory. The standard error of a sample variance is σ²·√((κ + 2)/n), κ the excess
 *   kurtosis, from Var(s²) ≈ (μ₄ − σ⁴)/n (common practice).
 * - a Kolmogorov–Smirnov test (continuous) or a chi-square test (discrete) of 2·10^5 draws
 *   against @stdlib's CDFs, at a fixed seed, failing below p = 0.001. The same tests reject
 *   draws of a slightly different distribution (the negative controls below), so they can fail.
 */
const N_MOMENTS = 1_000_000;
const N_FIT = 200_000;
const P_FAIL = 0.001;

function rngAt(seed: number): EpisodeRng {
  const rng = new EpisodeRng();
  seedStream(rng, seed, STREAM.ENV, 0);
  return rng;
}

function draws(n: number, seed: number, draw: (rng: EpisodeRng) => number): Float64Array {
  const rng = rngAt(seed);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = draw(rng);
  return out;
}

function meanAndVariance(x: Float64Array): { mean: number; variance: number } {
  let mean = 0;
  for (let i = 0; i < x.length; i++) mean += x[i];
  mean /= x.length;
  let ss = 0;
  for (let i = 0; i < x.length; i++) ss += (x[i] - mean) ** 2;
  return { mean, variance: ss / (x.length - 1) };
}

interface Moments {
  mean: number;
  variance: number;
  /** Excess kurtosis, for the standard error of the sample variance. */
  excessKurtosis: number;
}

function expectMoments(x: Float64Array, m: Moments): void {
  const n = x.length;
  const got = meanAndVariance(x);
  const seMean = Math.sqrt(m.variance / n);
  const seVariance = m.variance * Math.sqrt((m.excessKurtosis + 2) / n);
  expect(Math.abs(got.mean - m.mean) / seMean).toBeLessThan(5);
  expect(Math.abs(got.variance - m.variance) / seVariance).toBeLessThan(5);
}

const betaMoments = (a: number, b: number): Moments => ({
  mean: a / (a + b),
  variance: (a * b) / ((a + b) ** 2 * (a + b + 1)),
  excessKurtosis: (6 * ((a - b) ** 2 * (a + b + 1) - a * b * (a + b + 2))) / (a * b * (a + b + 2) * (a + b + 3)),
});

/** Moments of an index drawn with probability w[i]/Σw, by definition. */
function categoricalMoments(w: number[]): Moments {
  const total = w.reduce((s, v) => s + v, 0);
  const mean = w.reduce((s, v, i) => s + (i * v) / total, 0);
  const variance = w.reduce((s, v, i) => s + ((i - mean) ** 2 * v) / total, 0);
  const mu4 = w.reduce((s, v, i) => s + ((i - mean) ** 4 * v) / total, 0);
  return { mean, variance, excessKurtosis: mu4 / variance ** 2 - 3 };
}

interface Case {
  name: string;
  draw: (rng: EpisodeRng) => number;
  moments: Moments;
}

const dirichletAlphas = [2, 0.5, 3.5];
const dirichletOut = new Float64Array(3);

const CASES: Case[] = [
  { name: 'normal(3, 2)', draw: (r) => r.normal(3, 2), moments: { mean: 3, variance: 4, excessKurtosis: 0 } },
  { name: 'poisson(4)', draw: (r) => r.poisson(4), moments: { mean: 4, variance: 4, excessKurtosis: 1 / 4 } },
  { name: 'poisson(60)', draw: (r) => r.poisson(60), moments: { mean: 60, variance: 60, excessKurtosis: 1 / 60 } },
  { name: 'exponential(0.5)', draw: (r) => r.exponential(0.5), moments: { mean: 2, variance: 4, excessKurtosis: 6 } },
  { name: 'gamma(0.4, 3)', draw: (r) => r.gamma(0.4, 3), moments: { mean: 1.2, variance: 0.4 * 9, excessKurtosis: 6 / 0.4 } },
  { name: 'gamma(5, 0.5)', draw: (r) => r.gamma(5, 0.5), moments: { mean: 2.5, variance: 5 * 0.25, excessKurtosis: 6 / 5 } },
  { name: 'beta(0.5, 0.5)', draw: (r) => r.beta(0.5, 0.5), moments: betaMoments(0.5, 0.5) },
  { name: 'beta(2, 5)', draw: (r) => r.beta(2, 5), moments: betaMoments(2, 5) },
  { name: 'beta(4, 4)', draw: (r) => r.beta(4, 4), moments: betaMoments(4, 4) },
  { name: 'beta(0.7, 3)', draw: (r) => r.beta(0.7, 3), moments: betaMoments(0.7, 3) },
  { name: 'binomial(12, 0.3)', draw: (r) => r.binomial(12, 0.3), moments: { mean: 3.6, variance: 2.52, excessKurtosis: (1 - 6 * 0.21) / 2.52 } },
  { name: 'binomial(500, 0.8)', draw: (r) => r.binomial(500, 0.8), moments: { mean: 400, variance: 80, excessKurtosis: (1 - 6 * 0.16) / 80 } },
  { name: 'binomial(100, 0.3)', draw: (r) => r.binomial(100, 0.3), moments: { mean: 30, variance: 21, excessKurtosis: (1 - 6 * 0.21) / 21 } },
  { name: 'binomial(100000, 0.4)', draw: (r) => r.binomial(100000, 0.4), moments: { mean: 40000, variance: 24000, excessKurtosis: (1 - 6 * 0.24) / 24000 } },
  { name: 'binomial(5000, 0.001)', draw: (r) => r.binomial(5000, 0.001), moments: { mean: 5, variance: 4.995, excessKurtosis: (1 - 6 * 0.000999) / 4.995 } },
  { name: 'geometric(0.2)', draw: (r) => r.geometric(0.2), moments: { mean: 4, variance: 20, excessKurtosis: 6 + 0.04 / 0.8 } },
  { name: 'bernoulli(0.15)', draw: (r) => (r.bernoulli(0.15) ? 1 : 0), moments: { mean: 0.15, variance: 0.1275, excessKurtosis: (1 - 6 * 0.1275) / 0.1275 } },
  { name: 'categorical([1, 0, 2, 5])', draw: (r) => r.categorical([1, 0, 2, 5]), moments: categoricalMoments([1, 0, 2, 5]) },
  // A Dirichlet's component i is Beta(α_i, Σα − α_i).
  { name: 'dirichlet([2, 0.5, 3.5])[1]', draw: (r) => r.dirichlet(dirichletAlphas, dirichletOut)[1], moments: betaMoments(0.5, 5.5) },
];

describe('first two moments of 10^6 draws, within five standard errors of the textbook formulas', () => {
  it.each(CASES.map((c, i) => [c.name, c, i] as const))('%s', (_name, c, i) => {
    expectMoments(draws(N_MOMENTS, 100 + i, c.draw), c.moments);
  });
});

/**
 * Kolmogorov–Smirnov p-value with Stephens' (1970) small-sample factor:
 * Q(λ) = 2 Σ (−1)^(j−1) exp(−2 j² λ²), λ = (√n + 0.12 + 0.11/√n)·D, as given in Press et al.,
 * "Numerical Recipes" (3rd ed., 2007), §14.3.3 (from memory).
 */
function ksPValue(sample: Float64Array, cdf: (x: number) => number): number {
  const x = Float64Array.from(sample).sort();
  const n = x.length;
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f = cdf(x[i]);
    d = Math.max(d, f - i / n, (i + 1) / n - f);
  }
  const root = Math.sqrt(n);
  const lambda = (root + 0.12 + 0.11 / root) * d;
  let q = 0;
  for (let j = 1; j <= 100; j++) q += 2 * (j % 2 === 1 ? 1 : -1) * Math.exp(-2 * j * j * lambda * lambda);
  return Math.min(1, Math.max(0, q));
}

/**
 * Pearson's chi-square p-value for integer draws against a probability mass function, with
 * cells of expected count below 5 merged into their neighbours (common practice); the
 * chi-square(k) CDF is the Gamma(k/2, rate 1/2) CDF.
 */
function chiSquarePValue(sample: Float64Array, pmf: (k: number) => number, support: [number, number]): number {
  const n = sample.length;
  const counts = new Map<number, number>();
  for (const v of sample) counts.set(v, (counts.get(v) ?? 0) + 1);
  const cells: { observed: number; expected: number }[] = [];
  let open = { observed: 0, expected: 0 };
  let covered = 0;
  for (let k = support[0]; k <= support[1]; k++) {
    const p = pmf(k);
    covered += p;
    open.observed += counts.get(k) ?? 0;
    open.expected += n * p;
    if (open.expected >= 5) {
      cells.push(open);
      open = { observed: 0, expected: 0 };
    }
  }
  // Everything past the support's end (and a last small cell) joins the final cell.
  let beyond = 0;
  for (const [v, c] of counts) if (v < support[0] || v > support[1]) beyond += c;
  const last = cells[cells.length - 1];
  last.observed += open.observed + beyond;
  last.expected += open.expected + n * Math.max(0, 1 - covered);
  let stat = 0;
  for (const c of cells) stat += (c.observed - c.expected) ** 2 / c.expected;
  return 1 - gammaCdf(stat, (cells.length - 1) / 2, 0.5);
}

const pmfFromCdf = (cdf: (k: number) => number) => (k: number) => cdf(k) - (k > 0 ? cdf(k - 1) : 0);

describe('goodness of fit against @stdlib CDFs (2·10^5 draws, fails below p = 0.001)', () => {
  const continuous: [string, (r: EpisodeRng) => number, (x: number) => number][] = [
    ['normal(3, 2)', (r) => r.normal(3, 2), (x) => normalCdf(x, 3, 2)],
    ['exponential(0.5)', (r) => r.exponential(0.5), (x) => exponentialCdf(x, 0.5)],
    ['gamma(0.4, 3)', (r) => r.gamma(0.4, 3), (x) => gammaCdf(x, 0.4, 1 / 3)],
    ['gamma(5, 0.5)', (r) => r.gamma(5, 0.5), (x) => gammaCdf(x, 5, 2)],
    ['beta(0.5, 0.5)', (r) => r.beta(0.5, 0.5), (x) => betaCdf(x, 0.5, 0.5)],
    ['beta(2, 5)', (r) => r.beta(2, 5), (x) => betaCdf(x, 2, 5)],
    ['beta(4, 4)', (r) => r.beta(4, 4), (x) => betaCdf(x, 4, 4)],
    ['beta(0.7, 3)', (r) => r.beta(0.7, 3), (x) => betaCdf(x, 0.7, 3)],
    ['dirichlet([2, 0.5, 3.5])[2]', (r) => r.dirichlet(dirichletAlphas, dirichletOut)[2], (x) => betaCdf(x, 3.5, 2.5)],
  ];
  it.each(continuous.map((c, i) => [c[0], c, i] as const))('Kolmogorov–Smirnov: %s', (_name, [, draw, cdf], i) => {
    expect(ksPValue(draws(N_FIT, 300 + i, draw), cdf)).toBeGreaterThan(P_FAIL);
  });

  const discrete: [string, (r: EpisodeRng) => number, (k: number) => number, [number, number]][] = [
    ['poisson(4)', (r) => r.poisson(4), pmfFromCdf((k) => poissonCdf(k, 4)), [0, 40]],
    ['poisson(60)', (r) => r.poisson(60), pmfFromCdf((k) => poissonCdf(k, 60)), [0, 150]],
    ['binomial(12, 0.3)', (r) => r.binomial(12, 0.3), pmfFromCdf((k) => binomialCdf(k, 12, 0.3)), [0, 12]],
    ['binomial(500, 0.8)', (r) => r.binomial(500, 0.8), pmfFromCdf((k) => binomialCdf(k, 500, 0.8)), [0, 500]],
    ['binomial(100, 0.3)', (r) => r.binomial(100, 0.3), pmfFromCdf((k) => binomialCdf(k, 100, 0.3)), [0, 100]],
    ['binomial(100000, 0.4)', (r) => r.binomial(100000, 0.4), pmfFromCdf((k) => binomialCdf(k, 100000, 0.4)), [39000, 41000]],
    ['binomial(5000, 0.001)', (r) => r.binomial(5000, 0.001), pmfFromCdf((k) => binomialCdf(k, 5000, 0.001)), [0, 60]],
    ['geometric(0.2)', (r) => r.geometric(0.2), (k) => geometricPmf(k, 0.2), [0, 200]],
    ['bernoulli(0.15)', (r) => (r.bernoulli(0.15) ? 1 : 0), (k) => (k === 1 ? 0.15 : 0.85), [0, 1]],
    ['categorical([1, 0, 2, 5])', (r) => r.categorical([1, 0, 2, 5]), (k) => [1, 0, 2, 5][k] / 8, [0, 3]],
  ];
  it.each(discrete.map((c, i) => [c[0], c, i] as const))('chi-square: %s', (_name, [, draw, pmf, support], i) => {
    expect(chiSquarePValue(draws(N_FIT, 400 + i, draw), pmf, support)).toBeGreaterThan(P_FAIL);
  });

  it('negative controls: both tests reject draws of a slightly different distribution', () => {
    expect(ksPValue(draws(N_FIT, 500, (r) => r.normal(3.03, 2)), (x) => normalCdf(x, 3, 2))).toBeLessThan(P_FAIL);
    expect(ksPValue(draws(N_FIT, 501, (r) => r.gamma(5, 0.51)), (x) => gammaCdf(x, 5, 2))).toBeLessThan(P_FAIL);
    expect(chiSquarePValue(draws(N_FIT, 502, (r) => r.poisson(4.05)), pmfFromCdf((k) => poissonCdf(k, 4)), [0, 40])).toBeLessThan(P_FAIL);
    expect(chiSquarePValue(draws(N_FIT, 503, (r) => r.binomial(12, 0.31)), pmfFromCdf((k) => binomialCdf(k, 12, 0.3)), [0, 12])).toBeLessThan(P_FAIL);
  });
});

describe('a known probability', () => {
  it('Poisson(4): P(X = 0) = e^-4 = 0.0183156 (exact), within five standard errors over 10^6 draws', () => {
    const p0 = Math.exp(-4);
    expect(p0).toBeCloseTo(0.0183156, 7);
    const x = draws(N_MOMENTS, 600, (r) => r.poisson(4));
    let zeros = 0;
    for (const v of x) if (v === 0) zeros++;
    const se = Math.sqrt((p0 * (1 - p0)) / x.length);
    expect(Math.abs(zeros / x.length - p0) / se).toBeLessThan(5);
  });
});
