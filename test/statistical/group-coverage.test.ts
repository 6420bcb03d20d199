import { describe, expect, it } from 'vitest';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { streamFor } from '../../src/engine/streams.js';
import { exactEvaluation } from '../../src/exact/index.js';
import { groupMean } from '../../src/stats/groups/index.js';
import { inlineSource, smallGrid, towardsGoal } from './small-grid.js';

/**
 * A training method whose "seeds" give ε-policies of one base, ε on the grid 0, 0.01, …, 0.6
 * with weights ∝ exp(−(ε − 0.3)²/(2·0.1²)), a discretised normal: its true value is the
 * weighted mean of the 61 exact values (docs/methods.md §9), so the group interval can be
 * checked against the truth. (The member values are then close to normal, as the t interval on
 * member means assumes; with K = 5 a uniform spread of values already costs about two points
 * of coverage, common practice.) Members of a group run on the same episodes (common random
 * numbers), as `compare --group` runs them.
 */
const EPSILONS = Array.from({ length: 61 }, (_, i) => i / 100);
const WEIGHTS = EPSILONS.map((e) => Math.exp(-((e - 0.3) ** 2) / (2 * 0.1 ** 2)));
const TOTAL = WEIGHTS.reduce((a, b) => a + b, 0);

/** An index drawn with probability WEIGHTS[i]/TOTAL, by inversion of one uniform. */
function drawEpsilon(u: number): number {
  let left = u * TOTAL;
  for (let i = 0; i < WEIGHTS.length; i++) {
    left -= WEIGHTS[i];
    if (left < 0) return i;
  }
  return WEIGHTS.length - 1;
}
const member = (epsilon: number) => ({ kind: 'epsilon', epsilon, base: towardsGoal });
const spec = (epsilon: number, seed: number): RolloutSpec => ({
  env: { json: smallGrid, source: inlineSource },
  policy: { json: member(epsilon), source: inlineSource },
  seed,
  start: '2,0',
});

async function exactValue(epsilon: number): Promise<number> {
  const prepared = await prepareRollout(spec(epsilon, 0));
  if (prepared.env.kind !== 'finite' || prepared.policy.kind !== 'matrix') throw new Error('expected a compiled gridworld');
  return exactEvaluation(prepared.env.mdp, prepared.policy.matrix, { start: prepared.startIndex }).value;
}

describe('the group interval over training seeds, against exact member values', () => {
  it('covers the method’s exact value at 95% within binomial tolerance over 200 replications, where the naive pooled interval under-covers', async () => {
    const values = await Promise.all(EPSILONS.map(exactValue));
    const truth = values.reduce((sum, v, i) => sum + (v * WEIGHTS[i]) / TOTAL, 0);
    const replications = 200;
    const seeds = 5;
    const episodes = 100;
    let covered = 0;
    let naiveCovered = 0;
    let episodeShare = 0;
    const draw = streamFor(31, 0);
    for (let r = 0; r < replications; r++) {
      const members: Float64Array[] = [];
      for (let k = 0; k < seeds; k++) {
        const which = drawEpsilon(draw.uniform());
        const p = await prepareRollout(spec(EPSILONS[which], 7000 + r)); // one seed per replication: common random numbers
        const block = newBlock(0, episodes);
        p.runBlock(block);
        members.push(block.returns);
      }
      const g = groupMean(members, { level: 0.95, sharedEpisodes: true, seed: r });
      if (g.interval.low <= truth && truth <= g.interval.high) covered++;
      if (g.naive.low <= truth && truth <= g.naive.high) naiveCovered++;
      episodeShare += g.episodeShare / replications;
    }
    // Nominal 95%: sd of the coverage over 200 replications √(0.95·0.05/200) = 1.5%; ±3 sd.
    expect(covered / replications).toBeGreaterThanOrEqual(0.904);
    expect(covered / replications).toBeLessThanOrEqual(0.996);
    // The naive interval treats 500 episodes as independent: far below nominal here.
    expect(naiveCovered / replications).toBeLessThan(0.85);
    // Episodes and seeds both matter in this design (docs/methods.md §15.3 gives the figures).
    expect(episodeShare).toBeGreaterThan(0.2);
    expect(episodeShare).toBeLessThan(0.8);
  });
});
