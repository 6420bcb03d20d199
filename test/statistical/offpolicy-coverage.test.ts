/**
 * Off-policy intervals against the truth: logs recorded by `estimate --record`'s recorder
 * from a behaviour policy, whose target value `reckon exact` knows. Over 20 seeds a 95%
 * interval should miss about once; Bin(20, 0.95) gives P(fewer than 16 hits) ≈ 0.3%, so at
 * least 16 hits are required (binomial tolerance: common practice). The one-sided 95% betting
 * bound may exceed the value in at most 5% of the seeds in expectation: with 20 seeds up to 3
 * misses are accepted (P(4 or more) ≈ 1.6% at 5%), and a longer check over 100 seeds accepts
 * up to 9 (P(10 or more) ≈ 2.8% at exactly 5%; the bound is conservative, so less).
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadEnvironmentFile, loadPolicyFile } from '../../src/definitions/load.js';
import { recordFiniteEpisodes } from '../../src/engine/record-finite.js';
import { exactEvaluation } from '../../src/exact/index.js';
import { runOffPolicy } from '../../src/offpolicy/run-offpolicy.js';

const ROOT = path.resolve(__dirname, '../..');
const SEEDS = 20;

async function coverage(envPath: string, behaviourPath: string, targetPath: string, episodes: number, seeds = SEEDS, estimators: ('is' | 'pdis' | 'dr')[] = ['is', 'pdis', 'dr']) {
  const env = await loadEnvironmentFile(envPath);
  if (env.built.kind !== 'finite') throw new Error('finite environment expected');
  const mdp = env.built.mdp;
  const behaviour = await loadPolicyFile(behaviourPath, env.built);
  const target = await loadPolicyFile(targetPath, env.built);
  const truth = exactEvaluation(mdp, target.built.matrix!, {}).value;
  const behaviourValue = exactEvaluation(mdp, behaviour.built.matrix!, {}).value;
  const dir = mkdtempSync(path.join(tmpdir(), 'reckon-offpolicy-'));
  const hits: Record<string, number> = { is: 0, pdis: 0, dr: 0, 'is t': 0, 'pdis t': 0, 'dr t': 0, betting: 0, 'behaviour value': 0 };
  for (let seed = 1; seed <= seeds; seed++) {
    const logPath = path.join(dir, `log-${seed}.jsonl`);
    recordFiniteEpisodes(logPath, { mdp, policy: behaviour.built, seed, start: -1, first: 0, count: episodes, description: 'coverage test' });
    const run = await runOffPolicy({ logPath, policyPath: targetPath, envPath, estimators, level: 0.95, seed, resamples: seeds > SEEDS ? 100 : 400, folds: 2 });
    for (const e of run.result.estimators) {
      const [low, high] = e.intervals.bootstrap;
      if (low <= truth && truth <= high) hits[e.name]++;
      const [tLow, tHigh] = e.intervals.t!;
      if (tLow <= truth && truth <= tHigh) hits[`${e.name} t`]++;
      if (e.name === 'dr' && low <= behaviourValue && behaviourValue <= high) hits['behaviour value']++;
    }
    const betting = run.result.bounds.find((b) => b.method === 'betting-lower')!;
    if (betting.low <= truth) hits.betting++;
  }
  return { truth, hits };
}

describe('off-policy intervals cover the exact value of the target', () => {
  it('on the demo warehouse (ε-direct behaviour, direct target), 600 episodes a log', async () => {
    const { hits } = await coverage(path.join(ROOT, 'envs/warehouse.json'), path.join(ROOT, 'envs/picker-direct-eps.json'), path.join(ROOT, 'envs/picker-direct.json'), 600);
    for (const name of ['is', 'pdis', 'dr', 'is t', 'pdis t', 'dr t']) expect(hits[name], `${name}: ${JSON.stringify(hits)}`).toBeGreaterThanOrEqual(16);
    expect(hits.betting).toBeGreaterThanOrEqual(SEEDS - 3);
    // the test can fail: the same intervals rarely cover the behaviour's own value
    expect(hits['behaviour value']).toBeLessThanOrEqual(2);
  }, 120_000);
  it('on a tabular river ferry of our own, 400 episodes a log', async () => {
    const dir = path.join(ROOT, 'test/fixtures/off-policy');
    const { hits } = await coverage(path.join(dir, 'ferry-env.json'), path.join(dir, 'ferry-behaviour.json'), path.join(dir, 'ferry-target.json'), 400);
    for (const name of ['is', 'pdis', 'dr', 'is t', 'pdis t', 'dr t']) expect(hits[name], `${name}: ${JSON.stringify(hits)}`).toBeGreaterThanOrEqual(16);
    expect(hits.betting).toBeGreaterThanOrEqual(SEEDS - 3);
    // the test can fail: the same intervals rarely cover the behaviour's own value
    expect(hits['behaviour value']).toBeLessThanOrEqual(2);
  }, 120_000);
  it('the betting bound over 100 seeded ferry logs stays below the value in all but a few', async () => {
    const dir = path.join(ROOT, 'test/fixtures/off-policy');
    const { hits } = await coverage(path.join(dir, 'ferry-env.json'), path.join(dir, 'ferry-behaviour.json'), path.join(dir, 'ferry-target.json'), 400, 100, ['is']);
    expect(hits.betting).toBeGreaterThanOrEqual(91);
  }, 180_000);
  it('the two-sided betting interval with the largest weight known covers on the 2-state example, 1000 episodes a log', async () => {
    const dir = path.join(ROOT, 'test/fixtures/off-policy');
    const envPath = path.join(dir, 'two-state-env.json');
    const env = await loadEnvironmentFile(envPath);
    if (env.built.kind !== 'finite') throw new Error('finite environment expected');
    const behaviour = await loadPolicyFile(path.join(dir, 'two-state-behaviour.json'), env.built);
    const logs = mkdtempSync(path.join(tmpdir(), 'reckon-offpolicy-'));
    let hits = 0;
    for (let seed = 1; seed <= SEEDS; seed++) {
      const logPath = path.join(logs, `log-${seed}.jsonl`);
      recordFiniteEpisodes(logPath, { mdp: env.built.mdp, policy: behaviour.built, seed, start: -1, first: 0, count: 1000, description: 'coverage test' });
      const run = await runOffPolicy({ logPath, policyPath: path.join(dir, 'two-state-target.json'), envPath, behaviourPath: path.join(dir, 'two-state-behaviour.json'), estimators: ['is'], level: 0.95, seed, resamples: 100, folds: 2 });
      const two = run.result.bounds.find((b) => b.method === 'betting')!;
      // V^π = 1.340125 (scripts/methods/off_policy.py)
      if (two.low <= 1.340125 && 1.340125 <= two.high!) hits++;
    }
    expect(hits).toBeGreaterThanOrEqual(SEEDS - 3);
  }, 120_000);
});
