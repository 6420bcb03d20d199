import { describe, expect, it } from 'vitest';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { exactRisk } from '../../src/exact/exact-risk.js';
import { returnBounds } from '../../src/exact/index.js';
import { ReturnsBuffer } from '../../src/evaluate/returns-buffer.js';
import { riskFigures } from '../../src/evaluate/risk.js';
import { environmentFacts } from '../../src/evaluate/environment-facts.js';
import { parseEvent, type RiskRequest } from '../../src/options/risk-options.js';
import { readFileSync } from 'node:fs';
import { ENVS } from '../cli/run-cli.js';

/**
 * Risk intervals against the exact oracle (the enumerated return distribution of
 * src/exact/return-distribution.ts). Clopper–Pearson, the order-statistic quantile interval and
 * the DKW bound on the tail mean are finite-sample intervals, so each covers at 95% or more;
 * Wilson is approximate but close. Over 200 seeds a count of covers is Binomial(200, ≥ 0.95):
 * the tests fail below 181 (95% less 2.33 binomial sd, 1.5% each; common practice).
 */
const SEEDS = 200;
const MIN_COVERED = 181;
/** Several seconds each on a quiet machine; a shared one can take several times that. */
const LOADED_MACHINE_MS = 300_000;

// The demo's loading lane (envs/loading-lane.json): two terminal cells, the bay G (+1) and a drop-off edge X (−1).
const envFile = (name: string) => JSON.parse(readFileSync(`${ENVS}/${name}`, 'utf8'));
const envsSource = { label: 'envs', baseDir: ENVS };

const laneRequest: RiskRequest = { quantiles: [0.5], tail: 0.1, events: [parseEvent('return<0'), parseEvent('length>=12'), parseEvent('terminal=X'), parseEvent('terminal=G')] };

async function coverage(spec: (seed: number) => RolloutSpec, n: number, request: RiskRequest) {
  const prepared = await prepareRollout(spec(0));
  if (prepared.env.kind !== 'finite' || prepared.policy.kind !== 'matrix') throw new Error('expected a finite environment');
  const start = prepared.startIndex >= 0 ? prepared.startIndex : undefined;
  const exact = exactRisk(prepared.env.mdp, prepared.policy.matrix, start, request);
  if (!exact.distribution) throw new Error(`no exact distribution: ${exact.reason}`);
  const bounds = returnBounds(prepared.env.mdp, prepared.policy.matrix, start);
  const facts = environmentFacts(prepared.env, prepared.policy, prepared.startIndex);
  const covered = { median: 0, tailDkw: 0, tailBootstrap: 0, clopperPearson: request.events.map(() => 0), wilson: request.events.map(() => 0) };
  for (let seed = 1; seed <= SEEDS; seed++) {
    const run = await prepareRollout(spec(7000 + seed));
    const block = newBlock(0, n);
    run.runBlock(block);
    const buffer = new ReturnsBuffer(n, prepared.env.mdp.horizon);
    buffer.append(block.returns, block.lengths, block.finals);
    const risk = riskFigures(buffer, request, { level: 0.95, bounds, seed, facts });
    const inside = (x: number, ci: { low: number; high: number }) => ci.low <= x + 1e-12 && x - 1e-12 <= ci.high;
    if (inside(exact.quantiles![0].value, risk.quantiles[0])) covered.median++;
    if (inside(exact.tailMean!.value, risk.tail.dkw!)) covered.tailDkw++;
    if (inside(exact.tailMean!.value, risk.tail.bootstrap!)) covered.tailBootstrap++;
    risk.events.forEach((e, k) => {
      if (inside(exact.events[k].probability!, e.clopperPearson)) covered.clopperPearson[k]++;
      if (inside(exact.events[k].probability!, e.wilson)) covered.wilson[k]++;
    });
  }
  return { covered, exact };
}

describe('risk intervals cover the exact values over 200 seeds', () => {
  const laneSpec = (seed: number): RolloutSpec => ({ env: { json: envFile('loading-lane.json'), source: envsSource }, policy: { json: envFile('lane-explorer.json'), source: envsSource }, seed, start: null });
  for (const n of [200, 2000]) {
    it(`on a lane with two terminal cells, n = ${n}: median, tail mean (DKW), and the return, length and terminal events (Clopper–Pearson, Wilson)`, async () => {
      const { covered, exact } = await coverage(laneSpec, n, laneRequest);
      // the oracle itself is a real mixture: both terminals and long episodes happen
      for (const k of [0, 1]) expect(exact.events[k].probability!).toBeGreaterThan(0.05);
      // the drop-off edge is rare (0.013): a terminal event at n·p ≈ 2.6 and 26
      expect(exact.events[2].probability!).toBeGreaterThan(0.01);
      expect(exact.events[3].probability!).toBeLessThan(0.99);
      // the two terminals' absorption probabilities and truncation account for every episode
      expect(exact.events[2].probability! + exact.events[3].probability! + exact.endings.truncated).toBeCloseTo(1, 12);
      expect(covered.median).toBeGreaterThanOrEqual(MIN_COVERED);
      expect(covered.tailDkw).toBeGreaterThanOrEqual(MIN_COVERED);
      for (const k of [0, 1, 2, 3]) {
        expect(covered.clopperPearson[k]).toBeGreaterThanOrEqual(MIN_COVERED);
        expect(covered.wilson[k]).toBeGreaterThanOrEqual(MIN_COVERED);
      }
    }, LOADED_MACHINE_MS);
  }

  it('on the demo warehouse (careful picker), n = 200: median, tail mean (DKW), and P(return < 12) by both methods', async () => {
    const spec = (seed: number): RolloutSpec => ({ env: { json: envFile('warehouse.json'), source: envsSource }, policy: { json: envFile('picker-careful.json'), source: envsSource }, seed, start: null });
    const { covered, exact } = await coverage(spec, 200, { quantiles: [0.5], tail: 0.05, events: [parseEvent('return<12')] });
    expect(exact.events[0].probability).toBeCloseTo(0.5, 12); // the two docks are equally likely and lead to two returns
    expect(covered.median).toBeGreaterThanOrEqual(MIN_COVERED);
    expect(covered.tailDkw).toBeGreaterThanOrEqual(MIN_COVERED);
    expect(covered.clopperPearson[0]).toBeGreaterThanOrEqual(MIN_COVERED);
    expect(covered.wilson[0]).toBeGreaterThanOrEqual(MIN_COVERED);
  }, LOADED_MACHINE_MS);
});
