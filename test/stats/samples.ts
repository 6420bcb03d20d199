import { STREAM, streamFor } from '../../src/engine/streams.js';

/** Seeded test data. Not a test file: the samples only need to be reproducible, not exact. */

/** Normal(mean, sd) draws by the Box–Muller transform (Box & Muller 1958). */
export function normalSample(n: number, seed: number, mean = 0, sd = 1): Float64Array {
  const rng = streamFor(seed, STREAM.ENV);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const radius = Math.sqrt(-2 * Math.log(1 - rng.uniform()));
    out[i] = mean + sd * radius * Math.cos(2 * Math.PI * rng.uniform());
  }
  return out;
}

/** Exponential(1) draws by inversion, −ln(1 − U): skewness 2. */
export function exponentialSample(n: number, seed: number): Float64Array {
  const rng = streamFor(seed, STREAM.ENV);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = -Math.log(1 - rng.uniform());
  return out;
}
