import { describe, expect, it } from 'vitest';
import poisson from '@stdlib/random-base-poisson';
import exponential from '@stdlib/random-base-exponential';
import { EpisodeRng } from '../../src/engine/episode-rng.js';
import { VisitPolicyRng } from '../../src/engine/visit-noise.js';
import type { Rng } from '../../src/plugin.js';
import { STREAM, seedStream } from '../../src/engine/streams.js';

/**
 * The plug-in rng's named distributions keep no state between draws: after the engine
 * re-seeds a used generator in place, every sampler draws exactly what a fresh generator on
 * the same stream draws (the property that makes episodes addressable; common practice).
 */
const out3 = new Float64Array(3);
const everything = (r: Rng): number[] => [
  r.normal(1, 2),
  r.poisson(3),
  r.poisson(80),
  r.exponential(2),
  r.gamma(0.3, 1),
  r.gamma(7, 2),
  r.beta(0.5, 0.5),
  r.beta(3, 3),
  r.beta(2, 6),
  r.beta(0.5, 4),
  r.binomial(20, 0.2),
  r.binomial(400, 0.6),
  r.geometric(0.3),
  r.categorical([0.2, 0.5, 0.3]),
  r.bernoulli(0.4) ? 1 : 0,
  ...r.dirichlet([1, 2, 0.5], out3),
  r.uniform(),
];

describe('re-seeding in place', () => {
  it('a used generator, re-seeded, draws what a fresh one draws, for every sampler', () => {
    const used = new EpisodeRng();
    seedStream(used, 4, STREAM.ENV, 0);
    for (let i = 0; i < 5000; i++) everything(used);
    for (const episode of [7, 123456789]) {
      seedStream(used, 4, STREAM.ENV, episode);
      const fresh = new EpisodeRng();
      seedStream(fresh, 4, STREAM.ENV, episode);
      for (let k = 0; k < 200; k++) expect(everything(used)).toStrictEqual(everything(fresh));
    }
  });

  it('a code policy under visit-keyed noise gets the same samplers, its draws keyed by the visit', () => {
    const rng = new VisitPolicyRng();
    rng.key(3, 5);
    rng.at(2, 1);
    const first = everything(rng);
    rng.at(2, 1);
    expect(everything(rng)).toStrictEqual(first);
    rng.at(2, 2);
    expect(everything(rng)).not.toStrictEqual(first);
  });

  it('different episodes and streams give different draws', () => {
    const a = new EpisodeRng();
    const b = new EpisodeRng();
    seedStream(a, 4, STREAM.ENV, 1);
    seedStream(b, 4, STREAM.ENV, 2);
    expect(everything(a)).not.toStrictEqual(everything(b));
    seedStream(a, 4, STREAM.ENV, 1);
    seedStream(b, 4, STREAM.POLICY, 1);
    expect(everything(a)).not.toStrictEqual(everything(b));
  });
});

describe('the same draws as the @stdlib sampler on the same uniforms', () => {
  // The reference is the registry package's public sampler, fed the stream's open-interval
  // uniforms (uint32 + 0.5)·2^-32 from a second generator seeded alike.
  function pairOn(episode: number) {
    const ours = new EpisodeRng();
    const feed = new EpisodeRng();
    seedStream(ours, 6, STREAM.ENV, episode);
    seedStream(feed, 6, STREAM.ENV, episode);
    return { ours, prng: () => (feed.uint32() + 0.5) * 2.3283064365386963e-10 };
  }
  it.each([0.3, 4, 29.5, 30, 250])('poisson(%s)', (lambda) => {
    const { ours, prng } = pairOn(1);
    const reference = poisson.factory({ prng });
    for (let i = 0; i < 20000; i++) expect(ours.poisson(lambda)).toBe(reference(lambda));
  });
  it('exponential(0.7)', () => {
    const { ours, prng } = pairOn(2);
    const reference = exponential.factory({ prng });
    for (let i = 0; i < 20000; i++) expect(ours.exponential(0.7)).toBe(reference(0.7));
  });
});

describe('parameters', () => {
  const rng = new EpisodeRng();
  it.each([
    [() => rng.normal(0, 0), 'rng.normal: sigma must be a finite number > 0 (got 0)'],
    [() => rng.normal(NaN, 1), 'rng.normal: mu must be a finite number (got NaN)'],
    [() => rng.poisson(-1), 'rng.poisson: lambda must be a finite number > 0 (got -1)'],
    [() => rng.poisson('4' as unknown as number), 'rng.poisson: lambda must be a finite number > 0 (got "4")'],
    [() => rng.exponential(Infinity), 'rng.exponential: rate must be a finite number > 0 (got Infinity)'],
    [() => rng.gamma(2, -1), 'rng.gamma: scale must be a finite number > 0 (got -1)'],
    [() => rng.beta(0, 1), 'rng.beta: a must be a finite number > 0 (got 0)'],
    [() => rng.binomial(2.5, 0.5), 'rng.binomial: n must be an integer >= 0 (got 2.5)'],
    [() => rng.binomial(10, 1.5), 'rng.binomial: p must be a probability in [0, 1] (got 1.5)'],
    [() => rng.geometric(0), 'rng.geometric: p must be a probability in (0, 1] (got 0)'],
    [() => rng.bernoulli(-0.1), 'rng.bernoulli: p must be a probability in [0, 1] (got -0.1)'],
    [() => rng.categorical([]), 'rng.categorical: weights must be a non-empty array of weights (got [])'],
    [() => rng.categorical([1, -2]), 'rng.categorical: weights[1] must be a finite number >= 0 (got -2)'],
    [() => rng.categorical([0, 0]), 'rng.categorical: weights must be weights with a positive finite sum (got 0)'],
    [() => rng.dirichlet([1, 0], new Float64Array(2)), 'rng.dirichlet: alphas[1] must be a finite number > 0 (got 0)'],
    [() => rng.dirichlet([1, 1, 1], new Float64Array(2)), 'rng.dirichlet: out.length must be at least 3, the number of alphas (got 2)'],
  ])('%#: a bad value is named', (call, message) => {
    expect(call).toThrow(message);
  });

  it('edge values that are valid give the degenerate answers', () => {
    seedStream(rng, 1, STREAM.ENV, 0);
    expect(rng.binomial(0, 0.5)).toBe(0);
    expect(rng.binomial(9, 0)).toBe(0);
    expect(rng.binomial(9, 1)).toBe(9);
    expect(rng.geometric(1)).toBe(0);
    expect(rng.bernoulli(0)).toBe(false);
    expect(rng.bernoulli(1)).toBe(true);
    expect(rng.categorical([0, 0, 3])).toBe(2);
    const shares = rng.dirichlet([1, 1, 1, 1], [0, 0, 0, 0, 99]);
    expect(shares[0] + shares[1] + shares[2] + shares[3]).toBeCloseTo(1, 12);
    expect(shares[4]).toBe(99); // only the first alphas.length entries are written
  });
});
