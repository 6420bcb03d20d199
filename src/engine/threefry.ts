/**
 * Threefry-4×32 (Salmon, Moraes, Dror & Shaw, "Parallel random numbers: as easy as 1, 2, 3",
 * SC '11, 2011, §3.2): a counter-based generator. Its output is a keyed bijection of a
 * 128-bit counter under a 128-bit key, built from the Threefish block cipher's add-rotate-xor
 * rounds with a key injection every four rounds. Nothing is carried from one draw to the next,
 * so the draw for any (key, counter) is computed directly: the property visit-keyed noise
 * needs (engine/visit-noise.ts). Only 32-bit adds, rotations and xors: fast in JavaScript.
 *
 * Twenty rounds: the authors' default, with a margin over the fewest rounds that passed their
 * statistical tests. Tested against the known-answer vectors published with the authors'
 * Random123 library (test/engine/threefry.test.ts).
 */

/** Rotation constants of Threefry-4×32, round r uses ROTATIONS[r mod 8] (Salmon et al. 2011; Random123's threefry.h). */
const ROTATIONS: readonly (readonly [number, number])[] = [
  [10, 26],
  [11, 21],
  [13, 27],
  [23, 5],
  [6, 20],
  [17, 11],
  [25, 10],
  [18, 20],
];

/** Threefish's key-schedule parity constant for 32-bit words (Salmon et al. 2011; the Skein 1.3 specification). */
export const KEY_PARITY_32 = 0x1bd11bda;

/**
 * Threefry-4×32 with any number of rounds: the four output words for `counter` under `key`,
 * written into `into` as unsigned values. The reference form; the rollout loop uses
 * {@link Threefry20}, which gives the same words for 20 rounds without arrays.
 */
export function threefry4x32(rounds: number, counter: ArrayLike<number>, key: ArrayLike<number>, into: Uint32Array): void {
  const ks = [key[0] | 0, key[1] | 0, key[2] | 0, key[3] | 0, 0];
  ks[4] = KEY_PARITY_32 ^ ks[0] ^ ks[1] ^ ks[2] ^ ks[3];
  let x0 = (counter[0] + ks[0]) | 0;
  let x1 = (counter[1] + ks[1]) | 0;
  let x2 = (counter[2] + ks[2]) | 0;
  let x3 = (counter[3] + ks[3]) | 0;
  for (let r = 0; r < rounds; r++) {
    const [ra, rb] = ROTATIONS[r % 8];
    if (r % 2 === 0) {
      x0 = (x0 + x1) | 0;
      x1 = rotl(x1, ra) ^ x0;
      x2 = (x2 + x3) | 0;
      x3 = rotl(x3, rb) ^ x2;
    } else {
      x0 = (x0 + x3) | 0;
      x3 = rotl(x3, ra) ^ x0;
      x2 = (x2 + x1) | 0;
      x1 = rotl(x1, rb) ^ x2;
    }
    if (r % 4 === 3) {
      const j = (r + 1) / 4;
      x0 = (x0 + ks[j % 5]) | 0;
      x1 = (x1 + ks[(j + 1) % 5]) | 0;
      x2 = (x2 + ks[(j + 2) % 5]) | 0;
      x3 = (x3 + ks[(j + 3) % 5] + j) | 0;
    }
  }
  into[0] = x0;
  into[1] = x1;
  into[2] = x2;
  into[3] = x3;
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/**
 * Threefry-4×32-20 with its key fixed by {@link setKey} (once an episode) and the four output
 * words left in `out0`…`out3` by {@link draw}: no allocation, the rounds written out with
 * their constants, so a draw costs about a hundred 32-bit operations.
 */
export class Threefry20 {
  private k0 = 0;
  private k1 = 0;
  private k2 = 0;
  private k3 = 0;
  private k4 = KEY_PARITY_32;
  out0 = 0;
  out1 = 0;
  out2 = 0;
  out3 = 0;

  setKey(a: number, b: number, c: number, d: number): void {
    this.k0 = a | 0;
    this.k1 = b | 0;
    this.k2 = c | 0;
    this.k3 = d | 0;
    this.k4 = KEY_PARITY_32 ^ this.k0 ^ this.k1 ^ this.k2 ^ this.k3;
  }

  /** The block for counter (c0, c1, c2, c3), as signed words (`>>> 0` for unsigned). */
  draw(c0: number, c1: number, c2: number, c3: number): void {
    const k0 = this.k0;
    const k1 = this.k1;
    const k2 = this.k2;
    const k3 = this.k3;
    const k4 = this.k4;
    let x0 = (c0 + k0) | 0;
    let x1 = (c1 + k1) | 0;
    let x2 = (c2 + k2) | 0;
    let x3 = (c3 + k3) | 0;
    // Rounds 0–3, injection 1.
    x0 = (x0 + x1) | 0; x1 = ((x1 << 10) | (x1 >>> 22)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 26) | (x3 >>> 6)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 11) | (x3 >>> 21)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 21) | (x1 >>> 11)) ^ x2;
    x0 = (x0 + x1) | 0; x1 = ((x1 << 13) | (x1 >>> 19)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 27) | (x3 >>> 5)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 23) | (x3 >>> 9)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 5) | (x1 >>> 27)) ^ x2;
    x0 = (x0 + k1) | 0; x1 = (x1 + k2) | 0; x2 = (x2 + k3) | 0; x3 = (x3 + k4 + 1) | 0;
    // Rounds 4–7, injection 2.
    x0 = (x0 + x1) | 0; x1 = ((x1 << 6) | (x1 >>> 26)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 20) | (x3 >>> 12)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 17) | (x3 >>> 15)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 11) | (x1 >>> 21)) ^ x2;
    x0 = (x0 + x1) | 0; x1 = ((x1 << 25) | (x1 >>> 7)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 10) | (x3 >>> 22)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 18) | (x3 >>> 14)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 20) | (x1 >>> 12)) ^ x2;
    x0 = (x0 + k2) | 0; x1 = (x1 + k3) | 0; x2 = (x2 + k4) | 0; x3 = (x3 + k0 + 2) | 0;
    // Rounds 8–11, injection 3.
    x0 = (x0 + x1) | 0; x1 = ((x1 << 10) | (x1 >>> 22)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 26) | (x3 >>> 6)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 11) | (x3 >>> 21)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 21) | (x1 >>> 11)) ^ x2;
    x0 = (x0 + x1) | 0; x1 = ((x1 << 13) | (x1 >>> 19)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 27) | (x3 >>> 5)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 23) | (x3 >>> 9)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 5) | (x1 >>> 27)) ^ x2;
    x0 = (x0 + k3) | 0; x1 = (x1 + k4) | 0; x2 = (x2 + k0) | 0; x3 = (x3 + k1 + 3) | 0;
    // Rounds 12–15, injection 4.
    x0 = (x0 + x1) | 0; x1 = ((x1 << 6) | (x1 >>> 26)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 20) | (x3 >>> 12)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 17) | (x3 >>> 15)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 11) | (x1 >>> 21)) ^ x2;
    x0 = (x0 + x1) | 0; x1 = ((x1 << 25) | (x1 >>> 7)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 10) | (x3 >>> 22)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 18) | (x3 >>> 14)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 20) | (x1 >>> 12)) ^ x2;
    x0 = (x0 + k4) | 0; x1 = (x1 + k0) | 0; x2 = (x2 + k1) | 0; x3 = (x3 + k2 + 4) | 0;
    // Rounds 16–19, injection 5.
    x0 = (x0 + x1) | 0; x1 = ((x1 << 10) | (x1 >>> 22)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 26) | (x3 >>> 6)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 11) | (x3 >>> 21)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 21) | (x1 >>> 11)) ^ x2;
    x0 = (x0 + x1) | 0; x1 = ((x1 << 13) | (x1 >>> 19)) ^ x0; x2 = (x2 + x3) | 0; x3 = ((x3 << 27) | (x3 >>> 5)) ^ x2;
    x0 = (x0 + x3) | 0; x3 = ((x3 << 23) | (x3 >>> 9)) ^ x0; x2 = (x2 + x1) | 0; x1 = ((x1 << 5) | (x1 >>> 27)) ^ x2;
    this.out0 = (x0 + k0) | 0;
    this.out1 = (x1 + k1) | 0;
    this.out2 = (x2 + k2) | 0;
    this.out3 = (x3 + k3 + 5) | 0;
  }
}
