// What a draw from each named distribution of a plug-in's rng costs, against one rng.uniform()
// and against the hand-wired Poisson sampler the demo's restocking module used to build.
//
// Usage: npm run build && node scripts/bench-samplers.mjs [--draws 1000000] [--rounds 7]
//
// Each row: the median over rounds of (time of `draws` draws) / draws, after a warm-up round, on
// one thread, the rounds of all rows interleaved so that a change in the machine's load hits
// every row alike. Timings on a shared machine are noisy; compare the ratios within one run.
import { parseArgs } from 'node:util';
import poisson from '@stdlib/random-base-poisson';
import { EpisodeRng } from '../dist/engine/episode-rng.js';
import { STREAM, seedStream } from '../dist/engine/streams.js';

const { values } = parseArgs({ options: { draws: { type: 'string', default: '1000000' }, rounds: { type: 'string', default: '7' } } });
const DRAWS = Number(values.draws);
const ROUNDS = Number(values.rounds);

const rng = new EpisodeRng();
seedStream(rng, 2024, STREAM.ENV, 0);
const handWired = poisson.factory(4, { prng: () => rng.uniform() });
const shares = new Float64Array(4);
const weights = [0.1, 0.2, 0.3, 0.4];
const alphas = [1, 2, 3, 4];

const CASES = [
  ['rng.uniform()', () => rng.uniform()],
  ['rng.normal(0, 1)', () => rng.normal(0, 1)],
  ['rng.poisson(4)', () => rng.poisson(4)],
  ['hand-wired stdlib poisson(4) on rng.uniform', () => handWired()],
  ['rng.poisson(100)', () => rng.poisson(100)],
  ['rng.exponential(2)', () => rng.exponential(2)],
  ['rng.gamma(0.5, 1)', () => rng.gamma(0.5, 1)],
  ['rng.gamma(3, 1)', () => rng.gamma(3, 1)],
  ['rng.beta(2, 5)', () => rng.beta(2, 5)],
  ['rng.binomial(20, 0.3)', () => rng.binomial(20, 0.3)],
  ['rng.binomial(1000, 0.4)', () => rng.binomial(1000, 0.4)],
  ['rng.geometric(0.2)', () => rng.geometric(0.2)],
  ['rng.categorical(4 weights)', () => rng.categorical(weights)],
  ['rng.dirichlet(4 alphas, out)', () => rng.dirichlet(alphas, shares)[0]],
  ['rng.bernoulli(0.3)', () => (rng.bernoulli(0.3) ? 1 : 0)],
];

function round(draw) {
  let sink = 0;
  const start = process.hrtime.bigint();
  for (let i = 0; i < DRAWS; i++) sink += draw();
  const ns = Number(process.hrtime.bigint() - start);
  if (sink === -1) console.log(sink); // keeps the loop from being optimised away
  return ns / DRAWS;
}

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

for (const [, draw] of CASES) round(draw); // warm-up
const times = CASES.map(() => []);
for (let r = 0; r < ROUNDS; r++) CASES.forEach(([, draw], i) => times[i].push(round(draw)));
const rows = CASES.map(([name], i) => ({ name, ns: median(times[i]) }));
const uniformNs = rows[0].ns;
console.log(`${DRAWS.toLocaleString('en')} draws a round, median of ${ROUNDS} rounds; Node ${process.version}`);
console.log('');
console.log('| draw | ns/draw | × rng.uniform() |');
console.log('|---|---:|---:|');
for (const r of rows) {
  console.log(`| ${r.name} | ${r.ns.toFixed(1)} | ${(r.ns / uniformNs).toFixed(1)} |`);
}
