import { describe, expect, it } from 'vitest';
import { STREAM, streamFor } from '../../src/engine/streams.js';
import { InputError } from '../../src/errors.js';
import { ChowRobbinsRule } from '../../src/stats/chow-robbins.js';
import { EmpiricalBernsteinSequence } from '../../src/stats/empirical-bernstein-sequence.js';
import { NormalMixtureSequence, normalMixtureHalfWidth, tunedRho, tunedRhoRatio } from '../../src/stats/normal-mixture-sequence.js';
import { differenceBounds, type RunningInterval } from '../../src/stats/sequential-interval.js';
import { summarize } from '../../src/stats/summary.js';
import { tInterval } from '../../src/stats/t-interval.js';

describe('normal-mixture confidence sequence', () => {
  it('half-width for σ = 1, t = 1000, α = 0.05, ρ = 121.77 is 0.095979 (Robbins 1970; Howard et al. 2021; eq. 6.1 of docs/methods.md, scripts/methods/normal_mixture.py)', () => {
    expect(normalMixtureHalfWidth(1000, 1, 0.95, 121.77)).toBeCloseTo(0.095979, 6);
  });

  it('ρ tuned for t* = 1000 at α = 0.05 is 0.12177·t* (our derivation, docs/methods.md §6.3: r* = 0.12177 by scripts/methods/normal_mixture.py)', () => {
    expect(tunedRhoRatio(0.95)).toBeCloseTo(0.12177, 5);
    expect(tunedRho(1000, 0.95)).toBeCloseTo(121.77, 1);
    // and it does minimise the half-width at t*: nearby ρ are no better
    const best = normalMixtureHalfWidth(1000, 1, 0.95, tunedRho(1000, 0.95));
    for (const rho of [100, 110, 135, 150]) expect(normalMixtureHalfWidth(1000, 1, 0.95, rho)).toBeGreaterThan(best);
  });

  it('σ from bounds is (b − a)/2 (Hoeffding 1963, lemma); the interval is the mean ± the half-width, clipped to the bounds', () => {
    const sequence = new NormalMixtureSequence({ level: 0.95, bounds: [0, 2], rho: 50 });
    const values = Float64Array.from({ length: 400 }, (_, i) => (i % 3) * 0.7);
    sequence.add(values);
    const mean = summarize(values).mean;
    const halfWidth = normalMixtureHalfWidth(400, 1, 0.95, 50);
    const ci = sequence.interval();
    expect(ci).toMatchObject({ method: 'normal-mixture', anytimeValid: true, episodes: 400 });
    expect(ci.low).toBeCloseTo(mean - halfWidth, 12);
    expect(ci.high).toBeCloseTo(mean + halfWidth, 12);
    expect(sequence.sigmaSource).toBe('bounds');
  });

  it('a plugged-in running σ̂ is labelled asymptotic (docs/methods.md §6.3)', () => {
    const sequence = new NormalMixtureSequence({ level: 0.95, targetEpisodes: 100 });
    sequence.add([1, 2, 3, 4]);
    expect(sequence.interval()).toMatchObject({ method: 'normal-mixture-asymptotic', anytimeValid: false });
    expect(sequence.sigmaSource).toBe('estimated');
    expect(new NormalMixtureSequence({ level: 0.95, sigma: 2, rho: 10 }).interval().method).toBe('normal-mixture');
  });

  it('refuses a return outside the bounds it assumes, naming the episode', () => {
    const sequence = new NormalMixtureSequence({ level: 0.95, bounds: [0, 1], rho: 10 });
    expect(() => sequence.add([0.5, 1.5])).toThrow(/episode 1 has return 1.5/);
    expect(() => sequence.add([0.5, 1.5])).toThrow(InputError);
  });
});

describe('empirical-Bernstein confidence sequence', () => {
  it('alternating 0, 1, … gives C_100 = [0.32445, 0.67259] with c = 1/2 and no intersections (Waudby-Smith & Ramdas 2024 formulas; scripts/methods/empirical_bernstein.py, a re-implementation, not a published value)', () => {
    const sequence = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [0, 1], intersect: false });
    sequence.add(Float64Array.from({ length: 100 }, (_, i) => i % 2));
    const ci = sequence.interval();
    expect(ci.low).toBeCloseTo(0.32445, 5);
    expect(ci.high).toBeCloseTo(0.67259, 5);
  });

  it('first step by hand: x₁ = 0 → λ₁ = c = 1/2, v₁ = 1, C₁ = 0 ± 2(ln 40 + ψ_E(1/2)) = ±7.474332 (Waudby-Smith & Ramdas 2024 formulas)', () => {
    // μ̂₀ = 1/2, σ̂₀² = 1/4; √(2 ln 40/(¼·1·ln 2)) = √(2·3.6888795/0.1732868) = 6.52 > 1/2, so λ₁ = 1/2.
    // v₁ = 4(0 − 1/2)² = 1; ψ_E(1/2) = (ln 2 − 1/2)/4 = (0.6931472 − 0.5)/4 = 0.0482868.
    // centre Σλx/Σλ = 0; margin (3.6888795 + 0.0482868)/0.5 = 7.4743326.
    const sequence = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [0, 1], intersect: false });
    sequence.add([0]);
    const ci = sequence.interval();
    expect(ci.low).toBeCloseTo(-7.4743326, 6);
    expect(ci.high).toBeCloseTo(7.4743326, 6);
  });

  it('with intersections the interval stays in [a, b] and never widens (Waudby-Smith & Ramdas 2024: the coverage holds for all t at once, so intersecting is allowed)', () => {
    const sequence = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [-2, 3] });
    const rng = streamFor(5, STREAM.ENV);
    let previous = sequence.interval();
    expect([previous.low, previous.high]).toEqual([-2, 3]);
    for (let batch = 0; batch < 50; batch++) {
      sequence.add(Float64Array.from({ length: 20 }, () => -2 + 5 * rng.uniform() ** 3));
      const ci = sequence.interval();
      expect(ci.low).toBeGreaterThanOrEqual(previous.low);
      expect(ci.high).toBeLessThanOrEqual(previous.high);
      previous = ci;
    }
  });

  it('the result does not depend on how the values are batched (determinism of the running state)', () => {
    const rng = streamFor(8, STREAM.ENV);
    const values = Float64Array.from({ length: 1000 }, () => rng.uniform());
    const whole = new EmpiricalBernsteinSequence({ level: 0.9, bounds: [0, 1] });
    whole.add(values);
    const pieces = new EmpiricalBernsteinSequence({ level: 0.9, bounds: [0, 1] });
    for (let at = 0; at < 1000; at += 137) pieces.add(values.subarray(at, Math.min(1000, at + 137)));
    expect(pieces.interval()).toEqual(whole.interval());
  });

  it('paired differences use the bounds [a − b′, b − a′]', () => {
    expect(differenceBounds([0, 1], [0, 2])).toEqual([-2, 1]);
    const sequence = new EmpiricalBernsteinSequence({ level: 0.95, bounds: differenceBounds([0, 1], [0, 2]) });
    expect(() => sequence.add([-2, 1, 0.3])).not.toThrow();
    expect(() => sequence.add([1.2])).toThrow(InputError);
  });
});

describe('Chow–Robbins fixed-width rule', () => {
  it('is labelled asymptotic, and its 1/n term keeps it from stopping on ten zeros (Chow & Robbins 1965)', () => {
    const rule = new ChowRobbinsRule({ level: 0.95, minEpisodes: 10 });
    rule.add(new Float64Array(10));
    expect(rule.interval()).toMatchObject({ method: 'chow-robbins-asymptotic', anytimeValid: false });
    expect(rule.reached(0.01)).toBe(false);
    // all zeros: stop when n ≥ (z/d)²/n, i.e. n ≥ z/d = 195.996 → 196
    rule.add(new Float64Array(185));
    expect(rule.reached(0.01)).toBe(false);
    rule.add(new Float64Array(1));
    expect(rule.reached(0.01)).toBe(true);
  });
});

/** Bernoulli(p) returns of one replication, drawn from its own seeded stream. */
function bernoulliStream(seed: number, p: number): (count: number) => Float64Array {
  const rng = streamFor(seed, STREAM.ENV);
  return (count) => Float64Array.from({ length: count }, () => (rng.uniform() < p ? 1 : 0));
}

/** Runs until the half-width is ≤ ε (checked after every episode), returns whether μ was covered. */
function coveredAtStop(sequence: RunningInterval, draw: (count: number) => Float64Array, mu: number, epsilon: number): boolean {
  for (;;) {
    sequence.add(draw(1));
    const ci = sequence.interval();
    if (ci.halfWidth <= epsilon) return ci.low <= mu && mu <= ci.high;
  }
}

describe('coverage under optional stopping: Bernoulli(0.02) returns, stop at half-width ≤ 0.01, 200 seeded replications (docs/methods.md §6.1; scripts/methods/optional_stopping.py runs 2000)', () => {
  const mu = 0.02;
  const epsilon = 0.01;
  const replications = 200;

  it('the empirical-Bernstein sequence covers μ in at least 95% of runs (scripts/methods/optional_stopping.py: 99.1%)', () => {
    let covered = 0;
    const stops: number[] = [];
    for (let seed = 0; seed < replications; seed++) {
      const sequence = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [0, 1] });
      if (coveredAtStop(sequence, bernoulliStream(seed, mu), mu, epsilon)) covered++;
      stops.push(sequence.episodes);
    }
    expect(covered / replications).toBeGreaterThanOrEqual(0.95);
    stops.sort((a, b) => a - b);
    const median = stops[replications / 2];
    expect(median).toBeGreaterThan(1500); // scripts/methods/optional_stopping.py: median stop 2450
    expect(median).toBeLessThan(3500);
  });

  it('the normal mixture with σ = 1/2 from the bounds covers μ in at least 95% of runs', () => {
    let covered = 0;
    for (let seed = 0; seed < replications; seed++) {
      const sequence = new NormalMixtureSequence({ level: 0.95, bounds: [0, 1], targetEpisodes: 20000 });
      const draw = bernoulliStream(1000 + seed, mu);
      // its half-width does not depend on the data, so feed big batches until it is small enough
      while (sequence.interval().halfWidth > epsilon) sequence.add(draw(1000));
      const ci = sequence.interval();
      if (ci.low <= mu && mu <= ci.high) covered++;
    }
    expect(covered / replications).toBeGreaterThanOrEqual(0.95);
  });

  it('a naive t rule from n₀ = 10 does not: it stops at n = 10 on all-zero returns (scripts/methods/optional_stopping.py: 15.8% coverage)', () => {
    let covered = 0;
    for (let seed = 0; seed < replications; seed++) {
      const draw = bernoulliStream(seed, mu);
      const returns: number[] = [...draw(10)];
      for (;;) {
        const ci = tInterval(summarize(returns), 0.95);
        if (ci.halfWidth <= epsilon) {
          if (ci.low <= mu && mu <= ci.high) covered++;
          break;
        }
        returns.push(draw(1)[0]);
      }
    }
    expect(covered / replications).toBeLessThan(0.5);
  });
});
