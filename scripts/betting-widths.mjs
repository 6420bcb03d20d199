// Mean half-widths of the open-ended betting sequence and of the empirical-Bernstein sequence at
// n = 10², 10³, 10⁴, 10⁵ on seeded synthetic returns in [0, 1] (docs/methods.md §6.6, "which
// sequence is narrower"). Run after `npm run build`: node scripts/betting-widths.mjs [paths]
import { BettingSequence } from '../dist/stats/betting-sequence.js';
import { EmpiricalBernsteinSequence } from '../dist/stats/empirical-bernstein-sequence.js';
import { streamFor } from '../dist/engine/streams.js';

const paths = Number(process.argv[2] ?? 20);
const shapes = {
  'Bernoulli(0.1)': (u) => (u() < 0.1 ? 1 : 0),
  'Beta(2,5)': (u) => [u(), u(), u(), u(), u(), u()].sort((a, b) => a - b)[1], // 2nd of 6 uniforms
  '{0.4, 0.6}': (u) => (u() < 0.5 ? 0.4 : 0.6),
};
const checkpoints = [100, 1000, 10000, 100000];
console.log(`mean half-width over ${paths} seeded paths, 95%, read at n on one path of ${checkpoints.at(-1)}`);
console.log('| shape | n | betting (open-ended) | empirical Bernstein |');
console.log('|---|---|---|---|');
for (const [name, draw] of Object.entries(shapes)) {
  const sums = checkpoints.map(() => [0, 0]);
  for (let p = 0; p < paths; p++) {
    const rng = streamFor(4242 + p, 9, 0);
    const u = () => rng.uniform();
    const bet = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    const eb = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [0, 1] });
    let t = 0;
    checkpoints.forEach((n, k) => {
      const chunk = Float64Array.from({ length: n - t }, () => draw(u));
      bet.add(chunk);
      eb.add(chunk);
      t = n;
      sums[k][0] += bet.refined().halfWidth;
      sums[k][1] += eb.interval().halfWidth;
    });
  }
  checkpoints.forEach((n, k) => console.log(`| ${name} | ${n} | ${(sums[k][0] / paths).toPrecision(3)} | ${(sums[k][1] / paths).toPrecision(3)} |`));
}
