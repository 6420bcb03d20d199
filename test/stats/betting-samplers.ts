import { STREAM, streamFor } from '../../src/engine/streams.js';

/** Seeded draws from the three shapes the betting checks use: Bernoulli(0.1), Beta(2, 5) and {0.4, 0.6}. */
export function makeSampler(name: 'bernoulli' | 'beta' | 'two-point', seed: number): (n: number) => Float64Array {
  const rng = streamFor(seed, STREAM.BOOTSTRAP, 0);
  // Beta(2, 5) as the 2nd smallest of 6 uniforms (order statistics of the uniform: common practice).
  const beta = () => {
    const u = Array.from({ length: 6 }, () => rng.uniform()).sort((a, b) => a - b);
    return u[1];
  };
  return (n) =>
    Float64Array.from({ length: n }, () => {
      if (name === 'bernoulli') return rng.uniform() < 0.1 ? 1 : 0;
      if (name === 'beta') return beta();
      return rng.uniform() < 0.5 ? 0.4 : 0.6;
    });
}
