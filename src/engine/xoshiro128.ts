import type { UniformSource } from '../plugin.js';

/**
 * xoshiro128** 1.0 (Blackman & Vigna, "Scrambled linear pseudorandom number generators",
 * ACM TOMS 47(4), 2021): 128 bits of state, four 32-bit words, only 32-bit operations, so it
 * runs at full speed in JavaScript. Chosen over mt19937 because re-seeding it costs four
 * words instead of 624 (see engine/streams.ts and scripts/bench-seeding.mjs).
 */
export class Xoshiro128 implements UniformSource {
  s0 = 0;
  s1 = 0;
  s2 = 0;
  s3 = 1;

  /** Sets the state directly (an all-zero state is replaced by a fixed non-zero one). */
  setState(a: number, b: number, c: number, d: number): void {
    this.s0 = a >>> 0;
    this.s1 = b >>> 0;
    this.s2 = c >>> 0;
    this.s3 = d >>> 0;
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s3 = 1;
  }

  uint32(): number {
    const s1 = this.s1;
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= s1;
    this.s1 = s1 ^ this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /**
   * 32 random bits scaled to [0, 1): resolution 2^-32, ample for sampling tables. The step
   * of {@link uint32} is written out here rather than called: plug-ins call this in their
   * hot loops, and one call level fewer lets the JIT inline it whole, so the 32-bit word is
   * never boxed as a heap number on its way out.
   */
  uniform(): number {
    const s1 = this.s1;
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= s1;
    this.s1 = s1 ^ this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result * 2.3283064365386963e-10;
  }

  integer(n: number): number {
    return Math.floor(this.uniform() * n);
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
