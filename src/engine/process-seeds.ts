import { STREAM, seedStream } from './streams.js';
import { Xoshiro128 } from './xoshiro128.js';

const scratch = new Xoshiro128();

/**
 * The 64-bit seed a process environment (stream ENV) or a process policy (stream POLICY) gets
 * for episode `episode` of a run with seed `seed`: the first two 32-bit outputs u₀, u₁ of that
 * episode's stream, as 2³²·u₀ + u₁, in decimal (JSON numbers above 2⁵³ would lose bits; Python
 * reads the digits as an exact integer). A pure function of (seed, stream, episode), like every
 * draw of reckon's own rollouts.
 */
export function episodeSeed(seed: number, stream: typeof STREAM.ENV | typeof STREAM.POLICY, episode: number): string {
  seedStream(scratch, seed, stream, episode);
  const high = scratch.uint32();
  const low = scratch.uint32();
  return ((BigInt(high) << 32n) | BigInt(low)).toString();
}
