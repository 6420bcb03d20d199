import { Xoshiro128 } from './xoshiro128.js';

/**
 * Seeding scheme: episode i of a run with seed S draws from independent streams, one per
 * purpose, each a xoshiro128** generator whose 128-bit state is a hash of (S, stream, i).
 * - Addressable: episode i's draws depend on nothing but (S, i), so any worker, chunk,
 *   shard or resumed run replays exactly the same episode.
 * - Common random numbers: the environment's draws come from stream ENV and the policy's
 *   from stream POLICY, so two policies run with one seed face the same environment noise
 *   for as long as their trajectories agree.
 * - Cheap: re-seeding is four hashes (tens of nanoseconds), not a 624-word table.
 * - Distinct: (seed, stream, episode) is packed one-to-one into 128 bits, then mixed by a
 *   chain of invertible steps (each word xor-ed with a bijective 32-bit hash of another), so
 *   different inputs always give different starting states.
 * The 32-bit hash is the "lowbias32" finaliser (constants found by C. Wellons' hash
 * prospector, from memory); any bijective mixer would keep the scheme correct.
 */
export const STREAM = { ENV: 0, POLICY: 1, BOOTSTRAP: 2 } as const;

/** Largest accepted seed: any integer that a double holds exactly. */
export const MAX_SEED = Number.MAX_SAFE_INTEGER;

export function mix32(x: number): number {
  x ^= x >>> 16;
  x = Math.imul(x, 0x7feb352d);
  x ^= x >>> 15;
  x = Math.imul(x, 0x846ca68b);
  x ^= x >>> 16;
  return x >>> 0;
}

function hi32(n: number): number {
  return Math.floor(n / 4294967296) >>> 0;
}

/** Re-seeds `rng` in place for (seed, stream, episode); seed and episode below 2^53, stream below 256. */
export function seedStream(rng: Xoshiro128, seed: number, stream: number, episode: number): void {
  streamWords(seed, stream, episode, scratch);
  rng.setState(scratch[0], scratch[1], scratch[2], scratch[3]);
}

const scratch = new Int32Array(4);

/**
 * The four state words of the generator for (seed, stream, episode), written into `into`
 * (as signed 32-bit words): what {@link seedStream} installs. Rollout loops that keep the
 * generator's state in local variables seed from here.
 */
export function streamWords(seed: number, stream: number, episode: number, into: Int32Array): void {
  // One-to-one packing: the high words of seed and episode have at most 21 bits.
  let a = seed | 0;
  let b = hi32(seed) | (stream << 24);
  let c = episode | 0;
  let d = hi32(episode) ^ 0x9e3779b9;
  // Two rounds of invertible mixing: every output word depends on every input bit.
  for (let round = 0; round < 2; round++) {
    b ^= mix32(a ^ 0x6a09e667);
    c ^= mix32(b ^ 0xbb67ae85);
    d ^= mix32(c ^ 0x3c6ef372);
    a ^= mix32(d ^ 0xa54ff53a);
  }
  // An all-zero state is a fixed point of the generator; replaced as Xoshiro128.setState does.
  if ((a | b | c | d) === 0) d = 1;
  into[0] = a;
  into[1] = b;
  into[2] = c;
  into[3] = d;
}

/** A new generator for (seed, stream, episode): for one-off uses such as bootstrap resampling. */
export function streamFor(seed: number, stream: number, episode = 0): Xoshiro128 {
  const rng = new Xoshiro128();
  seedStream(rng, seed, stream, episode);
  return rng;
}
