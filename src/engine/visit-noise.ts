import type { UniformSource } from '../plugin.js';
import { withDistributions } from './episode-rng.js';
import { Threefry20 } from './threefry.js';

/**
 * Visit-keyed noise: the draws for the k-th visit of state s in episode i of a run with seed S
 * are the four words of Threefry-4×32-20 (engine/threefry.ts) under
 *   key     = (S mod 2^32, ⌊S / 2^32⌋ + VISIT_TAG·2^24, i mod 2^32, ⌊i / 2^32⌋)
 *   counter = (s, k, purpose, block)
 * Seed and episode are below 2^53, so the key is a one-to-one packing of (S, i). Purpose 0
 * is a visit: word 0 is the environment's (stream ENV) uniform, word 1 the tabulated policy's
 * (stream POLICY). Purpose 1 (s = k = 0) is the start-state draw, word 0. Purpose 2 holds a
 * code policy's successive draws at that visit, four words a block.
 */
export const VISIT_TAG = 0x56;
export const PURPOSE = { VISIT: 0, START: 1, CODE_POLICY: 2 } as const;

function hi32(n: number): number {
  return Math.floor(n / 4294967296) >>> 0;
}

/** Keys `g` for episode `episode` of seed `seed`. */
export function keyVisitNoise(g: Threefry20, seed: number, episode: number): void {
  g.setKey(seed | 0, hi32(seed) | (VISIT_TAG << 24), episode | 0, hi32(episode));
}

/**
 * Per-episode visit counts over states, reset in constant time by an epoch stamp: a state's
 * count is valid only when its stamp equals the current epoch. One per table set and thread.
 */
export class VisitCounts {
  readonly count: Int32Array;
  readonly stamp: Int32Array;
  epoch = 0;
  constructor(stateCount: number) {
    this.count = new Int32Array(stateCount);
    this.stamp = new Int32Array(stateCount);
  }

  /** Starts a new episode: every count is zero again. */
  nextEpisode(): number {
    if (this.epoch === 0x7fffffff) {
      this.stamp.fill(0);
      this.epoch = 0;
    }
    return ++this.epoch;
  }
}

const countsCache = new WeakMap<object, VisitCounts>();

/** The visit counts for a table set, allocated once (the rollout loop itself allocates nothing). */
export function visitCountsFor(tables: object, stateCount: number): VisitCounts {
  let counts = countsCache.get(tables);
  if (!counts || counts.count.length !== stateCount) {
    counts = new VisitCounts(stateCount);
    countsCache.set(tables, counts);
  }
  return counts;
}

/**
 * The uniforms of a code policy in visit mode: its j-th draw at the current visit is word
 * j mod 4 of the block (s, k, CODE_POLICY, ⌊j / 4⌋), so its draws too are keyed by the visit.
 */
class VisitPolicyUniforms implements UniformSource {
  private readonly g = new Threefry20();
  private state = 0;
  private visit = 0;
  private drawn = 0;

  /** Keys the generator for an episode (the same key as the environment's draws). */
  key(seed: number, episode: number): void {
    keyVisitNoise(this.g, seed, episode);
  }

  /** Moves to the k-th visit of state s: the next draw is the visit's first. */
  at(state: number, visit: number): void {
    this.state = state;
    this.visit = visit;
    this.drawn = 0;
  }

  uint32(): number {
    const j = this.drawn++;
    const w = j & 3;
    if (w === 0) this.g.draw(this.state, this.visit, PURPOSE.CODE_POLICY, j >>> 2);
    const g = this.g;
    return (w === 0 ? g.out0 : w === 1 ? g.out1 : w === 2 ? g.out2 : g.out3) >>> 0;
  }

  uniform(): number {
    return this.uint32() * 2.3283064365386963e-10;
  }

  integer(n: number): number {
    return Math.floor(this.uniform() * n);
  }
}

/** The `Rng` a code policy receives in visit mode: those uniforms plus the named distributions. */
export class VisitPolicyRng extends withDistributions(VisitPolicyUniforms) {}
