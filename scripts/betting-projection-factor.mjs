// Recomputes the running-intersection factor of the betting projection (docs/methods.md,
// "Planning a betting run"): seeded synthetic paths on [0, 1] are fed to the betting sequence
// with bets aimed at ε until its half-width is at most ε, as a target-error run does, and the
// median stopping time is divided by the expected-path count of modelledEpisodes. Run after
// `npm run build`: node scripts/betting-projection-factor.mjs [paths]
import { BettingSequence } from '../dist/stats/betting-sequence.js';
import { modelledEpisodes, RUNNING_INTERSECTION_FACTOR } from '../dist/stats/betting-projection.js';
import { streamFor } from '../dist/engine/streams.js';

const paths = Number(process.argv[2] ?? 40);
// Beta(2, 5) as the 2nd smallest of 6 uniforms (order statistics of the uniform).
const shapes = {
  'Bernoulli(0.1)': { mean: 0.1, variance: 0.09, draw: (u) => (u() < 0.1 ? 1 : 0) },
  'Beta(2,5)': { mean: 2 / 7, variance: 10 / (49 * 8), draw: (u) => [u(), u(), u(), u(), u(), u()].sort((a, b) => a - b)[1] },
  '{0.4, 0.6}': { mean: 0.5, variance: 0.01, draw: (u) => (u() < 0.5 ? 0.4 : 0.6) },
  '{0, 1}': { mean: 0.5, variance: 0.25, draw: (u) => (u() < 0.5 ? 0 : 1) },
  'Bernoulli(0.9)': { mean: 0.9, variance: 0.09, draw: (u) => (u() < 0.9 ? 1 : 0) },
};
const median = (xs) => { const s = [...xs].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2; };
const z = 1.959963984540054;
const ratios = [];
console.log(`| shape | n_CLT | ε | modelled | median stop (${paths} paths) | ratio |`);
console.log('|---|---|---|---|---|---|');
for (const [name, shape] of Object.entries(shapes)) {
  for (const nClt of [100, 1000, 10000]) {
    const e = (z * Math.sqrt(shape.variance)) / Math.sqrt(nClt);
    const modelled = modelledEpisodes({ epsilon: e, mean: shape.mean, variance: shape.variance, bounds: [0, 1], level: 0.95, schedule: { kind: 'target', halfWidth: e } });
    const stops = [];
    for (let p = 0; p < paths; p++) {
      const rng = streamFor(9000 + p, 7, nClt);
      const u = () => rng.uniform();
      const sequence = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'target', halfWidth: e } });
      const one = new Float64Array(1);
      while (sequence.interval().halfWidth > e) {
        one[0] = shape.draw(u);
        sequence.add(one);
      }
      stops.push(sequence.episodes);
    }
    const ratio = median(stops) / modelled;
    ratios.push(ratio);
    console.log(`| ${name} | ${nClt} | ${e.toPrecision(3)} | ${modelled} | ${median(stops)} | ${ratio.toFixed(3)} |`);
  }
}
console.log(`\nmedian ratio over the ${ratios.length} cases: ${median(ratios).toFixed(3)} (range ${Math.min(...ratios).toFixed(3)}–${Math.max(...ratios).toFixed(3)}); the projection uses ${RUNNING_INTERSECTION_FACTOR}`);
