// Episodes a target-error run spends against the oracle fixed-n count (z·σ/E)², where σ is the
// exact return std of `reckon exact`; and how often the stopped estimate lands within E of the
// exact value. Run after `npm run build`: node scripts/target-error-efficiency.mjs [replications]
// Each case runs the product's own path (runEstimate, one worker) with seeds 1..R.
import { readFileSync } from 'node:fs';
import { runEstimate } from '../dist/evaluate/estimate.js';
import { prepareRollout } from '../dist/engine/prepare.js';
import { exactEvaluation } from '../dist/exact/index.js';
import { planEpisodes, summarize, normalQuantile } from '../dist/stats/index.js';
import { newBlock } from '../dist/engine/episode-block.js';
import { randomMdpRows, tabularDefinition } from './bench/random-mdp.mjs';

const replications = Number(process.argv[2] ?? 20);
const methods = (process.argv[3] ?? 'betting,empirical-bernstein').split(',');
const here = { label: 'envs', baseDir: new URL('../envs/', import.meta.url).pathname };
const inline = { label: 'inline', baseDir: process.cwd() };
const file = (name) => JSON.parse(readFileSync(new URL(`../envs/${name}`, import.meta.url), 'utf8'));

// The statistical tests' small slippery grid (test/statistical/small-grid.ts), an ε = 0.3 policy.
const smallGrid = {
  kind: 'gridworld', discount: 0.95, horizon: 60, step_reward: -0.04, layout: ['...+', '.#.-', '....'],
  cells: { '.': { slip: 0.2 }, '#': { wall: true }, '+': { terminal: true, reward: 1 }, '-': { terminal: true, reward: -1 } },
};
const towardsGoal = { kind: 'table', default: 'up', states: { '0,0': 'right', '0,1': 'right', '0,2': 'right', '2,1': 'left', '2,2': 'left', '2,3': 'left' } };
// A random 60-state tabular MDP of our own (invented numbers), uniform policy.
const randomMdp = tabularDefinition(randomMdpRows({ states: 60, actions: 3, successors: 3, terminals: 2, terminalChance: 0.05, seed: 77 }), { discount: 0.95, horizon: 200 });

const only = process.env.CASES ? Number(process.env.CASES) : null;
const cases = [
  { name: 'demo careful picker', env: { json: file('warehouse.json'), source: here }, policy: { json: file('picker-careful.json'), source: here }, start: null, errors: [0.002] },
  { name: 'small test grid, ε = 0.3', env: { json: smallGrid, source: inline }, policy: { json: { kind: 'epsilon', epsilon: 0.3, base: towardsGoal }, source: inline }, start: '2,0', errors: [0.1, 0.05] },
  { name: 'random 60-state MDP, uniform', env: { json: randomMdp, source: inline }, policy: { json: { kind: 'uniform' }, source: inline }, start: null, errors: [0.1, 0.05] },
];

const median = (xs) => { const s = [...xs].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2; };
const z = normalQuantile(0.975);
console.log(`target-error runs, ${replications} seeds each, 95% level; oracle n = (z·σ/E)² with the exact σ`);
console.log('| case | E | method | oracle n | median episodes | ratio | within E of exact | plan (pilot 2,000) / run, median |');
console.log('|---|---|---|---|---|---|---|---|');
for (const c of only === null ? cases : cases.slice(only, only + 1)) {
  const spec = (seed) => ({ env: c.env, policy: c.policy, seed, start: c.start });
  const prepared = await prepareRollout(spec(0));
  const exact = exactEvaluation(prepared.env.mdp, prepared.policy.matrix, prepared.startIndex >= 0 ? { start: prepared.startIndex } : {});
  for (const E of c.errors) {
    const oracle = Math.ceil((z * exact.std / E) ** 2);
    for (const method of methods) {
      const used = [];
      const planRatio = [];
      let within = 0;
      for (let seed = 1; seed <= replications; seed++) {
        const result = await runEstimate({ spec: spec(seed), episodes: 50_000_000, workers: 1, method, level: 0.95, bounds: null, targetError: E });
        used.push(result.episodes);
        if (Math.abs(result.mean - exact.value) <= E) within++;
        // the plan a user would get from a 2,000-episode pilot of the same seed
        const pilotSpec = await prepareRollout(spec(seed));
        const block = newBlock(0, 2000);
        pilotSpec.runBlock(block);
        const plan = planEpisodes({ pilot: summarize(block.returns), epsilon: E, level: 0.95, bounds: result.bounds });
        const planned = method === 'betting' ? plan.betting : method === 'empirical-bernstein' ? plan.empiricalBernstein : null;
        if (planned !== null) planRatio.push(planned / result.episodes);
      }
      const m = median(used);
      console.log(`| ${c.name} | ${E} | ${method} | ${oracle.toLocaleString('en')} | ${m.toLocaleString('en')} | ${(m / oracle).toFixed(2)}× | ${within}/${replications} | ${planRatio.length ? median(planRatio).toFixed(2) : '–'} |`);
    }
  }
}

// 200 seeded replications of the default run on the small test grid at E = 0.1: how often the
// stopped estimate lands within E of the exact value, and how often the interval covers it.
{
  const c = cases[1];
  const E = 0.1;
  const spec = (seed) => ({ env: c.env, policy: c.policy, seed, start: c.start });
  const prepared = await prepareRollout(spec(0));
  const exact = exactEvaluation(prepared.env.mdp, prepared.policy.matrix, { start: prepared.startIndex });
  let within = 0;
  let covered = 0;
  const R = 200;
  for (let seed = 10_001; seed <= 10_000 + R; seed++) {
    const result = await runEstimate({ spec: spec(seed), episodes: 1_000_000, workers: 1, method: null, level: 0.95, bounds: null, targetError: E });
    if (Math.abs(result.mean - exact.value) <= E) within++;
    if (result.ci.low <= exact.value && exact.value <= result.ci.high) covered++;
  }
  console.log(`\n${c.name}, E = ${E}, default sequence, ${R} seeds: |mean − exact| ≤ E in ${within}/${R}; interval covers the exact value in ${covered}/${R}`);
}
