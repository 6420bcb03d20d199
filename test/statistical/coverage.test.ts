import { describe, expect, it } from 'vitest';
import { prepareRollout } from '../../src/engine/prepare.js';
import { newBlock } from '../../src/engine/episode-block.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { exactEvaluation, returnBounds } from '../../src/exact/index.js';
import { confidenceInterval, summarize, type CiMethod } from '../../src/stats/index.js';
import { inlineSource, smallGrid, towardsGoal } from './small-grid.js';

/** Monte Carlo against the exact oracle, on the shared small grid under an epsilon-greedy policy so returns are genuinely random. */
const env = smallGrid;
const policy = { kind: 'epsilon', epsilon: 0.3, base: towardsGoal };
const source = inlineSource;

function spec(seed: number): RolloutSpec {
  return { env: { json: env, source }, policy: { json: policy, source }, seed, start: '2,0' };
}

async function sampleReturns(seed: number, episodes: number): Promise<Float64Array> {
  const prepared = await prepareRollout(spec(seed));
  const block = newBlock(0, episodes);
  prepared.runBlock(block);
  return block.returns;
}

async function exactValue(): Promise<{ value: number; std: number }> {
  const prepared = await prepareRollout(spec(0));
  if (prepared.env.kind !== 'finite' || prepared.policy.kind !== 'matrix') throw new Error('expected a compiled gridworld');
  const result = exactEvaluation(prepared.env.mdp, prepared.policy.matrix, { start: prepared.startIndex });
  return { value: result.value, std: result.std };
}

describe('Monte Carlo intervals cover the exact value', () => {
  const replications = 240;
  const episodes = 400;

  it('over seeded replications, t covers 91–98% and Hoeffding and Bernstein at least 95%', async () => {
    const exact = await exactValue();
    const hits: Record<CiMethod, number> = { t: 0, normal: 0, hoeffding: 0, bernstein: 0, bootstrap: 0, 'bootstrap-percentile': 0 };
    const prepared = await prepareRollout(spec(0));
    if (prepared.env.kind !== 'finite' || prepared.policy.kind !== 'matrix') throw new Error('expected a compiled gridworld');
    const bounds = returnBounds(prepared.env.mdp, prepared.policy.matrix, prepared.startIndex);
    for (let r = 0; r < replications; r++) {
      const returns = await sampleReturns(1000 + r, episodes);
      const summary = summarize(returns);
      for (const method of ['t', 'hoeffding', 'bernstein'] as const) {
        const ci = confidenceInterval(returns, summary, { method, level: 0.95, bounds });
        if (ci.low <= exact.value && exact.value <= ci.high) hits[method]++;
      }
    }
    // Nominal 95%: accept 91–98%, 2–3 binomial standard deviations either side at 240 replications
    // (sd = √(0.95·0.05/240) ≈ 1.4%; common practice for coverage checks).
    expect(hits.t / replications).toBeGreaterThanOrEqual(0.91);
    expect(hits.t / replications).toBeLessThanOrEqual(0.98);
    // Hoeffding (1963) and Maurer & Pontil (2009) are finite-sample bounds: coverage ≥ nominal.
    expect(hits.hoeffding / replications).toBeGreaterThanOrEqual(0.95);
    expect(hits.bernstein / replications).toBeGreaterThanOrEqual(0.95);
  });

  it('the sample std converges to the exact return std (second-moment recursion)', async () => {
    const exact = await exactValue();
    const summary = summarize(await sampleReturns(7, 40000));
    // Standard error of a sample std ≈ σ/√(2n) for near-normal data; allow 5 of them (common practice).
    expect(Math.abs(summary.std - exact.std)).toBeLessThan(5 * exact.std * Math.sqrt(2 / 40000) + 0.01 * exact.std);
    expect(Math.abs(summary.mean - exact.value)).toBeLessThan(5 * summary.stderr);
  });

  it('quadrupling the episodes halves the t half-width within 10% (the 1/√n law, common practice)', async () => {
    const small = await sampleReturns(11, 20000);
    const large = await sampleReturns(12, 80000);
    const hwSmall = confidenceInterval(small, summarize(small), { method: 't', level: 0.95 }).halfWidth;
    const hwLarge = confidenceInterval(large, summarize(large), { method: 't', level: 0.95 }).halfWidth;
    expect(hwLarge / hwSmall).toBeGreaterThan(0.5 * 0.9);
    expect(hwLarge / hwSmall).toBeLessThan(0.5 * 1.1);
  });
});
