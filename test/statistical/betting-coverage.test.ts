import { describe, expect, it } from 'vitest';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import { STREAM, streamFor } from '../../src/engine/streams.js';
import { exactEvaluation, returnBounds } from '../../src/exact/index.js';
import { BettingSequence, type BetSchedule } from '../../src/stats/betting-sequence.js';
import { inlineSource, smallGrid, towardsGoal } from './small-grid.js';

/**
 * Ville's inequality makes the betting sequence miss the mean at ANY time with probability at
 * most α (Waudby-Smith & Ramdas 2024, Theorem 3). Its running intersection only shrinks, so a
 * path that missed at some t ≤ n also misses at n: checking the end of each path checks the
 * whole path. With 400 paths and α = 0.05 the count of misses is at most Binomial(400, 0.05),
 * mean 20, sd 4.4; the tests fail above 30 (the one-sided 99% point, normal approximation).
 */
const PATHS = 400;
const LENGTH = 20_000;
const MAX_MISSES = 30;
/** About 15 s each on a quiet machine; a shared one can take several times that. */
const LOADED_MACHINE_MS = 300_000;

function missesOf(paths: number, length: number, draw: (path: number) => Float64Array, truth: number, bounds: [number, number], schedule: BetSchedule): number {
  let misses = 0;
  for (let p = 0; p < paths; p++) {
    const sequence = new BettingSequence({ level: 0.95, bounds, schedule });
    sequence.add(draw(p).subarray(0, length));
    const ci = sequence.interval();
    if (!(ci.low <= truth && truth <= ci.high)) misses++;
  }
  return misses;
}

describe('betting confidence sequence: time-uniform coverage over seeded paths', () => {
  it(`Bernoulli(0.1): at most ${MAX_MISSES} of ${PATHS} paths of ${LENGTH} ever miss, for open-ended and for targeted bets`, () => {
    const draw = (p: number) => {
      const rng = streamFor(500 + p, STREAM.ENV, 0);
      return Float64Array.from({ length: LENGTH }, () => (rng.uniform() < 0.1 ? 1 : 0));
    };
    const anytime = missesOf(PATHS, LENGTH, draw, 0.1, [0, 1], { kind: 'anytime' });
    const targeted = missesOf(PATHS, LENGTH, draw, 0.1, [0, 1], { kind: 'target', halfWidth: 0.01 });
    expect(anytime).toBeLessThanOrEqual(MAX_MISSES);
    expect(targeted).toBeLessThanOrEqual(MAX_MISSES);
  }, LOADED_MACHINE_MS);

  it(`the small slippery grid under an ε = 0.3 policy against its exact value: at most ${MAX_MISSES} of ${PATHS} paths of ${LENGTH} ever miss`, async () => {
    const policy = { kind: 'epsilon', epsilon: 0.3, base: towardsGoal };
    const spec = (seed: number) => ({ env: { json: smallGrid, source: inlineSource }, policy: { json: policy, source: inlineSource }, seed, start: '2,0' });
    const prepared = await prepareRollout(spec(0));
    if (prepared.env.kind !== 'finite' || prepared.policy.kind !== 'matrix') throw new Error('expected a compiled gridworld');
    const exact = exactEvaluation(prepared.env.mdp, prepared.policy.matrix, { start: prepared.startIndex });
    const bounds = returnBounds(prepared.env.mdp, prepared.policy.matrix, prepared.startIndex);
    const returnsOf: Float64Array[] = [];
    for (let p = 0; p < PATHS; p++) {
      const run = await prepareRollout(spec(3000 + p));
      const block = newBlock(0, LENGTH);
      run.runBlock(block);
      returnsOf.push(block.returns);
    }
    const targeted = missesOf(PATHS, LENGTH, (p) => returnsOf[p], exact.value, bounds, { kind: 'target', halfWidth: 0.02 });
    expect(targeted).toBeLessThanOrEqual(MAX_MISSES);
    // a fixed-size run tuned to n = 1000: coverage at n at least nominal, within the same tolerance
    const planned = missesOf(PATHS, 1000, (p) => returnsOf[p], exact.value, bounds, { kind: 'planned', episodes: 1000 });
    expect(planned).toBeLessThanOrEqual(MAX_MISSES);
  }, LOADED_MACHINE_MS);
});
