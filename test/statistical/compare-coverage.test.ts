import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { runEstimate } from '../../src/evaluate/estimate.js';
import { exactEvaluation } from '../../src/exact/index.js';
import { comparePair, summarize, tQuantile } from '../../src/stats/index.js';
import { readDefinitionFile } from '../../src/definitions/index.js';
import { inlineSource, smallGrid, towardsGoal } from './small-grid.js';

/** Comparisons and target-error runs against the exact oracle, on the shared small grid. */
const env = smallGrid;
const base = towardsGoal;
const source = inlineSource;
const policyA = { kind: 'epsilon', epsilon: 0.1, base };
const policyB = { kind: 'epsilon', epsilon: 0.4, base };

function spec(policy: unknown, seed: number): RolloutSpec {
  return { env: { json: env, source }, policy: { json: policy, source }, seed, start: '2,0' };
}

async function returns(policy: unknown, seed: number, episodes: number): Promise<Float64Array> {
  const prepared = await prepareRollout(spec(policy, seed));
  const block = newBlock(0, episodes);
  prepared.runBlock(block);
  return block.returns;
}

async function exact(policy: unknown): Promise<{ value: number; std: number }> {
  const prepared = await prepareRollout(spec(policy, 0));
  if (prepared.env.kind !== 'finite' || prepared.policy.kind !== 'matrix') throw new Error('expected a compiled gridworld');
  return exactEvaluation(prepared.env.mdp, prepared.policy.matrix, { start: prepared.startIndex });
}

describe('paired comparisons on common random numbers', () => {
  it('the paired t interval covers the exact difference at its nominal rate over 240 replications', async () => {
    const difference = (await exact(policyA)).value - (await exact(policyB)).value;
    let covered = 0;
    const replications = 240;
    for (let r = 0; r < replications; r++) {
      const pair = comparePair(await returns(policyA, 500 + r, 300), await returns(policyB, 500 + r, 300), { level: 0.95 });
      if (pair.interval.low <= difference && difference <= pair.interval.high) covered++;
    }
    // Nominal 95%; the 91–98% band allows for binomial noise at 240 replications (sd ≈ 1.4%).
    expect(covered / replications).toBeGreaterThanOrEqual(0.91);
    expect(covered / replications).toBeLessThanOrEqual(0.98);
  });

  it('for two close policies (epsilon 0.25 vs 0.20 on one base) pairing at least halves the half-width', async () => {
    const envs = path.resolve(__dirname, '../../envs');
    const warehouse = readDefinitionFile(path.join(envs, 'warehouse.json'));
    const direct = readDefinitionFile(path.join(envs, 'picker-direct.json'));
    const epsilon = (e: number) => ({ kind: 'epsilon', epsilon: e, base: direct.json });
    const run = async (policy: unknown, seed: number) => {
      const prepared = await prepareRollout({ env: warehouse, policy: { json: policy, source: direct.source }, seed, start: null });
      const block = newBlock(0, 20000);
      prepared.runBlock(block);
      return block.returns;
    };
    const a = await run(epsilon(0.25), 1);
    const bPaired = await run(epsilon(0.2), 1);
    const bIndependent = await run(epsilon(0.2), 2);
    const paired = comparePair(a, bPaired, { level: 0.95 }).interval.halfWidth;
    // Independent runs: the difference of two independent means (common practice).
    const sa = summarize(a);
    const sb = summarize(bIndependent);
    const independent = tQuantile(0.975, 2 * 20000 - 2) * Math.sqrt(sa.variance / 20000 + sb.variance / 20000);
    expect(paired / independent).toBeLessThanOrEqual(0.5);
  });
});

describe('running until a target error', () => {
  it('stops with half-width ≤ E on the default betting sequence, covers the exact value at the nominal level over 200 replications, and lands within E', async () => {
    const truth = (await exact(policyA)).value;
    const replications = 200;
    const target = 0.05;
    let covered = 0;
    let within = 0;
    let stoppedEarly = 0;
    for (let r = 0; r < replications; r++) {
      const result = await runEstimate({
        spec: spec(policyA, 9000 + r),
        episodes: 200_000,
        workers: 1,
        method: null,
        level: 0.95,
        bounds: null,
        targetError: target,
      });
      expect(result.ci.method).toBe('betting');
      expect(result.target?.reached).toBe(true);
      expect(result.ci.halfWidth).toBeLessThanOrEqual(target);
      if (result.episodes < 200_000) stoppedEarly++;
      if (result.ci.low <= truth && truth <= result.ci.high) covered++;
      if (Math.abs(result.mean - truth) <= target) within++;
    }
    expect(stoppedEarly).toBe(replications);
    // Anytime-valid (Waudby-Smith & Ramdas 2024, Theorem 3): coverage ≥ 95% at any stopping
    // time. The betting sequence spends most of its α, so 200 replications may show a little
    // less: the bound is 95% less 2.33 binomial sd (√(0.95·0.05/200) = 1.5%), i.e. 91.5%.
    expect(covered / replications).toBeGreaterThanOrEqual(0.915);
    expect(within / replications).toBeGreaterThanOrEqual(0.95);
  });

  it('the stopping episode is the same whatever the workers (a pure function of the returns)', async () => {
    const run = (workers: number) =>
      runEstimate({ spec: spec(policyA, 77), episodes: 100_000, workers, method: null, level: 0.95, bounds: null, targetError: 0.03 });
    const one = await run(1);
    const two = await run(2);
    expect(two.episodes).toBe(one.episodes);
    expect(two.mean).toBe(one.mean);
    expect(two.ci).toStrictEqual(one.ci);
  });
});
