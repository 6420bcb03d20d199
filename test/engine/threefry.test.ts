import { describe, expect, it } from 'vitest';
import { Threefry20, threefry4x32 } from '../../src/engine/threefry.js';

/**
 * Known-answer vectors published with Random123 (Salmon, Moraes, Dror & Shaw, SC '11),
 * tests/kat_vectors: "threefry4x32 ROUNDS counter[4] key[4] output[4]".
 */
const KAT: readonly [number, number[], number[], number[]][] = [
  [13, [0, 0, 0, 0], [0, 0, 0, 0], [0x531c7e4f, 0x39491ee5, 0x2c855a92, 0x3d6abf9a]],
  [13, [0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0xc4189358, 0x1c9cc83a, 0xd5881c67, 0x6a0a89e0]],
  [13, [0x243f6a88, 0x85a308d3, 0x13198a2e, 0x03707344], [0xa4093822, 0x299f31d0, 0x082efa98, 0xec4e6c89], [0x4aa71d8f, 0x734738c2, 0x431fc6a8, 0xae6debf1]],
  [20, [0, 0, 0, 0], [0, 0, 0, 0], [0x9c6ca96a, 0xe17eae66, 0xfc10ecd4, 0x5256a7d8]],
  [20, [0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0x2a881696, 0x57012287, 0xf6c7446e, 0xa16a6732]],
  [20, [0x243f6a88, 0x85a308d3, 0x13198a2e, 0x03707344], [0xa4093822, 0x299f31d0, 0x082efa98, 0xec4e6c89], [0x59cd1dbb, 0xb8879579, 0x86b5d00c, 0xac8b6d84]],
  [72, [0, 0, 0, 0], [0, 0, 0, 0], [0x93171da6, 0x9220326d, 0xb392b7b1, 0xff58a002]],
  [72, [0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff], [0x60743f3d, 0x9961e684, 0xaab21c34, 0x8c65fb7d]],
  [72, [0x243f6a88, 0x85a308d3, 0x13198a2e, 0x03707344], [0xa4093822, 0x299f31d0, 0x082efa98, 0xec4e6c89], [0x09930adf, 0x7f27bd55, 0x9ed68ce1, 0x97f803f6]],
];

describe('Threefry-4x32 against the Random123 known-answer vectors', () => {
  it.each(KAT.map((c) => [c[0], c[1].map((w) => w.toString(16)).join(','), c] as const))('%i rounds, counter [%s]', (_r, _label, [rounds, counter, key, expected]) => {
    const out = new Uint32Array(4);
    threefry4x32(rounds, counter, key, out);
    expect(Array.from(out)).toEqual(expected);
  });

  it('the unrolled 20-round form gives the published 20-round outputs', () => {
    const g = new Threefry20();
    for (const [rounds, counter, key, expected] of KAT) {
      if (rounds !== 20) continue;
      g.setKey(key[0], key[1], key[2], key[3]);
      g.draw(counter[0], counter[1], counter[2], counter[3]);
      expect([g.out0 >>> 0, g.out1 >>> 0, g.out2 >>> 0, g.out3 >>> 0]).toEqual(expected);
    }
  });

  it('the unrolled form agrees with the reference form on varied keys and counters (common practice)', () => {
    const g = new Threefry20();
    const out = new Uint32Array(4);
    for (let i = 0; i < 200; i++) {
      const key = [Math.imul(i, 0x9e3779b9) >>> 0, i * 7 + 1, 0xdeadbeef ^ i, (i << 20) >>> 0];
      const counter = [i, i * i, 3 - i, 0xffffffff - i].map((w) => w >>> 0);
      threefry4x32(20, counter, key, out);
      g.setKey(key[0], key[1], key[2], key[3]);
      g.draw(counter[0], counter[1], counter[2], counter[3]);
      expect([g.out0 >>> 0, g.out1 >>> 0, g.out2 >>> 0, g.out3 >>> 0]).toEqual(Array.from(out));
    }
  });
});
