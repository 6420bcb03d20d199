import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readDefinitionFile } from '../../src/definitions/index.js';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { exactEvaluation } from '../../src/exact/index.js';
import { runEstimate } from '../../src/evaluate/estimate.js';
import { confidenceInterval, summarize } from '../../src/stats/index.js';
import { inlineSource as source, smallGrid, towardsGoal } from './small-grid.js';

/**
 * Visit-keyed noise must not bias an estimate: each draw is still a uniform independent of
 * everything before it in the episode, because the k-th visit of a state is a fresh counter.
 * Checked against the exact value and return std from exact dynamic programming (the
 * Bellman recursions of `reckon exact`, src/exact; Sutton & Barto 2018, §4.1) over seeded
 * replications: the grand mean within 4 standard errors, the t interval's coverage within a
 * binomial band, and the return variance.
 */
const ENVS = path.resolve(import.meta.dirname, '../../envs');
const cases: { name: string; spec: (seed: number) => RolloutSpec }[] = [
  {
    name: 'small slippery grid, ε-greedy, start distribution',
    spec: (seed) => ({ env: { json: smallGrid, source }, policy: { json: { kind: 'epsilon', epsilon: 0.3, base: towardsGoal }, source }, seed, start: null, noise: 'visit' }),
  },
  {
    name: 'warehouse demo, picker-direct-eps',
    spec: (seed) => ({
      env: readDefinitionFile(path.join(ENVS, 'warehouse.json')),
      policy: readDefinitionFile(path.join(ENVS, 'picker-direct-eps.json')),
      seed,
      start: null,
      noise: 'visit',
    }),
  },
];

describe('visit-keyed noise keeps each policy\'s estimate unbiased (exact dynamic programming)', () => {
  const replications = 200;
  const episodes = 500;

  it.each(cases)('$name', async ({ spec }) => {
    const first = await prepareRollout(spec(0));
    if (first.env.kind !== 'finite' || first.policy.kind !== 'matrix') throw new Error('expected a compiled finite MDP');
    const exact = exactEvaluation(first.env.mdp, first.policy.matrix);
    let grand = 0;
    let pooledSquares = 0;
    let covered = 0;
    for (let r = 0; r < replications; r++) {
      const prepared = await prepareRollout(spec(5000 + r));
      const block = newBlock(0, episodes);
      prepared.runBlock(block);
      const summary = summarize(block.returns);
      grand += summary.mean / replications;
      for (const g of block.returns) pooledSquares += (g - exact.value) ** 2;
      const ci = confidenceInterval(block.returns, summary, { method: 't', level: 0.95, bounds: null });
      if (ci.low <= exact.value && exact.value <= ci.high) covered++;
    }
    const total = replications * episodes;
    // The grand mean of 100,000 returns: within 4 standard errors σ/√N of the exact value.
    expect(Math.abs(grand - exact.value)).toBeLessThanOrEqual((4 * exact.std) / Math.sqrt(total));
    // Mean squared deviation from the exact value estimates the exact variance: within 5%.
    expect(pooledSquares / total / exact.std ** 2).toBeGreaterThan(0.95);
    expect(pooledSquares / total / exact.std ** 2).toBeLessThan(1.05);
    // Nominal 95% over 200 replications: sd √(0.95·0.05/200) ≈ 1.5%, so 90–99% is about 3 sd
    // either side (common practice for coverage checks).
    expect(covered / replications).toBeGreaterThanOrEqual(0.9);
    expect(covered / replications).toBeLessThanOrEqual(0.99);
  });
});

describe('visit-keyed noise with a code policy on a finite environment (exact dynamic programming)', () => {
  // A module policy that draws from the generator it is handed (VisitPolicyRng in visit mode):
  // ε = 0.3 uniform, else the towards-goal table; probabilities(state) states the same law, so
  // `reckon exact` can evaluate it.
  const dir = mkdtempSync(path.join(tmpdir(), 'reckon-visit-code-'));
  writeFileSync(
    path.join(dir, 'coin-policy.js'),
    `const toward = ${JSON.stringify(towardsGoal.states)};
export default function create(options, { actions }) {
  const base = (s) => toward[s] ?? 'up';
  return {
    act(state, rng) { return rng.uniform() < 0.3 ? rng.integer(actions.length) : base(state); },
    probabilities(state) {
      const p = Object.fromEntries(actions.map((a) => [a, 0.3 / actions.length]));
      p[base(state)] += 0.7;
      return p;
    },
  };
}
`,
  );
  const codeSource = { label: 'coin-policy.json', baseDir: dir };
  const codeSpec = (seed: number): RolloutSpec => ({
    env: { json: smallGrid, source },
    policy: { json: { kind: 'module', path: './coin-policy.js' }, source: codeSource },
    seed,
    start: null,
    noise: 'visit',
  });

  it('is unbiased against the exact value of its stated probabilities', async () => {
    const first = await prepareRollout(codeSpec(0));
    if (first.env.kind !== 'finite' || first.policy.kind !== 'code' || !first.policy.matrix) throw new Error('expected a tabulated code policy');
    const exact = exactEvaluation(first.env.mdp, first.policy.matrix);
    const block = newBlock(0, 60_000);
    first.runBlock(block);
    const summary = summarize(block.returns);
    expect(Math.abs(summary.mean - exact.value)).toBeLessThanOrEqual((4 * exact.std) / Math.sqrt(block.count));
    expect(summary.std / exact.std).toBeGreaterThan(0.97);
    expect(summary.std / exact.std).toBeLessThan(1.03);
  });

  it('gives the same episodes with 1 and 2 workers', async () => {
    const run = (workers: number) => runEstimate({ spec: codeSpec(3), episodes: 6000, workers, method: 't', level: 0.95, bounds: null, targetError: null });
    const [one, two] = [await run(1), await run(2)];
    expect([two.mean, two.std, two.steps]).toStrictEqual([one.mean, one.std, one.steps]);
  });
});
