// Paired comparisons under step-keyed and visit-keyed noise (`--noise step|visit`): how much
// narrower the paired interval is than the independent one, and what visit keying costs per
// step. Run after `npm run build`:   node scripts/bench-noise.mjs [--episodes N] [--seeds R]
//
// For each pair of policies and each mode, R seeds of N episodes per policy: the paired 95%
// half-width z·sd(A − B)/√N against the independent one z·√(Var A + Var B)/√N, pooled over the
// seeds (the ratio of pooled variances, square-rooted), with the spread of the per-seed ratios.
// Speed: steps/s of one thread rolling out the first policy, the two modes alternated in one
// process, median of several rounds. The machine may be shared: compare ratios, not figures.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { prepareRollout } from '../dist/engine/prepare.js';
import { newBlock } from '../dist/engine/episode-block.js';
import { readDefinitionFile } from '../dist/definitions/index.js';
import { randomMdpRows, tabularDefinition } from './bench/random-mdp.mjs';

const args = process.argv.slice(2);
const option = (name, fallback) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : fallback;
};
const EPISODES = option('episodes', 40_000);
const SEEDS = option('seeds', 5);
const SPEED_ROUNDS = option('rounds', 7);
const Z = 1.959963984540054;

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const file = (name) => readDefinitionFile(path.join(root, 'envs', name));
const inline = (label, json) => ({ json, source: { label, baseDir: root } });

// A gridworld of our own for the benchmark (invented): a courier crosses a windy yard to the
// loading door (G); gusty cells (~) push it sideways 25% of the time, the pond (O) ends the
// episode with a penalty.
const yard = inline('courier-yard', {
  kind: 'gridworld',
  name: 'courier-yard',
  discount: 0.98,
  step_reward: -0.05,
  bump_reward: -0.2,
  layout: [
    'S.....~~.',
    '.##.#.~~.',
    '.#..#..#.',
    '.#.O#.##.',
    '...~~~..G',
  ],
  cells: {
    '.': { slip: 0.05 },
    S: { start: 1 },
    '#': { wall: true },
    '~': { slip: 0.25 },
    O: { terminal: true, reward: -5 },
    G: { terminal: true, reward: 10 },
  },
});
const yardRoute = {
  kind: 'arrows',
  rows: [
    '>>>>>>>>v',
    'v##^#^^>v',
    'v#>>#^<#v',
    'v#^O#^##v',
    '>>^>>>>>>',
  ],
  key: {},
};
const yardEps = (epsilon) => inline(`yard ε=${epsilon}`, { kind: 'epsilon', epsilon, base: yardRoute });

// A random tabular MDP of our own (scripts/bench/random-mdp.mjs): 40 states, 3 actions, 3
// successors, episodes of about 60 steps; two table policies that differ in 4 of 38 states.
const mdp = randomMdpRows({ states: 40, actions: 3, successors: 3, terminals: 2, terminalChance: 0.02, seed: 77 });
const tabular = inline('random-40', tabularDefinition(mdp, { discount: 0.99, horizon: 400 }));
const tablePolicy = (label, changed) => {
  const states = {};
  for (let s = 0; s < 38; s++) states[`s${s}`] = { a0: 0.6, a1: 0.3, a2: 0.1 };
  for (const s of changed) states[`s${s}`] = { a0: 0.3, a1: 0.6, a2: 0.1 };
  return inline(label, { kind: 'table', states });
};

const PAIRS = [
  { name: 'warehouse: picker-direct vs picker-careful', env: file('warehouse.json'), a: file('picker-direct.json'), b: file('picker-careful.json') },
  { name: 'warehouse: picker-direct vs picker-direct-eps', env: file('warehouse.json'), a: file('picker-direct.json'), b: file('picker-direct-eps.json') },
  { name: 'courier yard: ε = 0.05 vs ε = 0.10', env: yard, a: yardEps(0.05), b: yardEps(0.1) },
  { name: 'random 40-state MDP: two tables, 4 states differ', env: tabular, a: tablePolicy('table A', []), b: tablePolicy('table B', [3, 11, 20, 29]) },
];

async function prepare(env, policy, seed, noise) {
  return prepareRollout({ env, policy, seed, start: null, noise });
}

function moments(x) {
  let mean = 0;
  for (let i = 0; i < x.length; i++) mean += (x[i] - mean) / (i + 1);
  let ss = 0;
  for (let i = 0; i < x.length; i++) ss += (x[i] - mean) ** 2;
  return { mean, variance: ss / (x.length - 1) };
}

async function pairing(pair, noise) {
  let pooledPaired = 0;
  let pooledIndependent = 0;
  const ratios = [];
  for (let seed = 1; seed <= SEEDS; seed++) {
    const a = newBlock(0, EPISODES);
    const b = newBlock(0, EPISODES);
    (await prepare(pair.env, pair.a, seed, noise)).runBlock(a);
    (await prepare(pair.env, pair.b, seed, noise)).runBlock(b);
    const d = new Float64Array(EPISODES);
    for (let i = 0; i < EPISODES; i++) d[i] = a.returns[i] - b.returns[i];
    const paired = moments(d).variance;
    const independent = moments(a.returns).variance + moments(b.returns).variance;
    pooledPaired += paired;
    pooledIndependent += independent;
    ratios.push(Math.sqrt(paired / independent));
  }
  ratios.sort((x, y) => x - y);
  return {
    ratio: Math.sqrt(pooledPaired / pooledIndependent),
    low: ratios[0],
    high: ratios[ratios.length - 1],
    pairedHalfWidth: Z * Math.sqrt(pooledPaired / SEEDS / EPISODES),
  };
}

async function speed(pair) {
  const prepared = { step: await prepare(pair.env, pair.a, 9, 'step'), visit: await prepare(pair.env, pair.a, 9, 'visit') };
  const rates = { step: [], visit: [] };
  // Size a round to about 0.3 s of step-mode work.
  const probe = newBlock(0, 2000);
  const t0 = performance.now();
  const probeSteps = prepared.step.runBlock(probe);
  const perEpisode = (performance.now() - t0) / 2000 / 1000;
  const count = Math.max(2000, Math.min(2_000_000, Math.round(0.3 / Math.max(perEpisode, 1e-9))));
  void probeSteps;
  for (let round = 0; round < SPEED_ROUNDS; round++) {
    for (const mode of round % 2 === 0 ? ['step', 'visit'] : ['visit', 'step']) {
      const block = newBlock(round * count, count);
      const started = performance.now();
      const steps = prepared[mode].runBlock(block);
      rates[mode].push(steps / ((performance.now() - started) / 1000));
    }
  }
  const median = (x) => [...x].sort((p, q) => p - q)[Math.floor(x.length / 2)];
  return { step: median(rates.step), visit: median(rates.visit) };
}

const fmt = (x, d = 3) => x.toFixed(d);
const rows = [];
for (const pair of PAIRS) {
  const step = await pairing(pair, 'step');
  const visit = await pairing(pair, 'visit');
  const rate = await speed(pair);
  rows.push({ pair, step, visit, rate });
  process.stderr.write(`done: ${pair.name}\n`);
}

console.log(`${EPISODES.toLocaleString('en-US')} episodes per policy, ${SEEDS} seeds per mode; speed: median of ${SPEED_ROUNDS} rounds, one thread`);
console.log('');
console.log('| pair | paired/independent half-width, step | same, visit | episodes for one paired half-width, visit vs step | steps/s, step | steps/s, visit | visit/step speed |');
console.log('|---|---|---|---|---|---|---|');
for (const { pair, step, visit, rate } of rows) {
  const episodes = (visit.pairedHalfWidth / step.pairedHalfWidth) ** 2;
  console.log(
    `| ${pair.name} | ${fmt(step.ratio)} (${fmt(step.low)}–${fmt(step.high)}) | ${fmt(visit.ratio)} (${fmt(visit.low)}–${fmt(visit.high)}) | ${fmt(episodes, 2)}× | ${(rate.step / 1e6).toFixed(1)} M | ${(rate.visit / 1e6).toFixed(1)} M | ${fmt(rate.visit / rate.step, 2)} |`,
  );
}
