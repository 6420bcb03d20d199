// Coverage of reckon's risk intervals against the exact oracle, over seeded runs: the quantile
// interval (order statistics), the worst-α mean by the DKW band and by the percentile bootstrap,
// and two event probabilities (a return event, and ending in the drop-off cell X) by
// Clopper–Pearson and by Wilson, on envs/loading-lane.json (two terminal cells) under
// envs/lane-explorer.json. Run after `npm run build`:
//   node scripts/risk-coverage.mjs [seeds]
import { readFileSync } from 'node:fs';
import { newBlock } from '../dist/engine/episode-block.js';
import { prepareRollout } from '../dist/engine/prepare.js';
import { exactRisk } from '../dist/exact/exact-risk.js';
import { returnBounds } from '../dist/exact/index.js';
import { ReturnsBuffer } from '../dist/evaluate/returns-buffer.js';
import { riskFigures } from '../dist/evaluate/risk.js';
import { environmentFacts } from '../dist/evaluate/environment-facts.js';
import { parseEvent } from '../dist/options/risk-options.js';

const seeds = Number(process.argv[2] ?? 200);
const envs = new URL('../envs/', import.meta.url).pathname;
const source = { label: 'envs', baseDir: envs };
const lane = JSON.parse(readFileSync(`${envs}loading-lane.json`, 'utf8'));
const explorer = JSON.parse(readFileSync(`${envs}lane-explorer.json`, 'utf8'));
const spec = (seed) => ({ env: { json: lane, source }, policy: { json: explorer, source }, seed, start: null });

console.log(`| n | tail α | n·α | median (order statistics) | worst-α mean, DKW | worst-α mean, bootstrap | P(return<0), Clopper–Pearson | P(return<0), Wilson | P(terminal=X), Clopper–Pearson | P(terminal=X), Wilson |`);
console.log('|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|');
const prepared = await prepareRollout(spec(0));
const bounds = returnBounds(prepared.env.mdp, prepared.policy.matrix);
const facts = environmentFacts(prepared.env, prepared.policy, prepared.startIndex);
for (const n of [200, 2000]) {
  for (const tail of [0.05, 0.1]) {
    const request = { quantiles: [0.5], tail, events: [parseEvent('return<0'), parseEvent('terminal=X')] };
    const exact = exactRisk(prepared.env.mdp, prepared.policy.matrix, undefined, request);
    const hits = [0, 0, 0, 0, 0, 0, 0];
    for (let seed = 1; seed <= seeds; seed++) {
      const run = await prepareRollout(spec(7000 + seed));
      const block = newBlock(0, n);
      run.runBlock(block);
      const buffer = new ReturnsBuffer(n, prepared.env.mdp.horizon);
      buffer.append(block.returns, block.lengths, block.finals);
      const risk = riskFigures(buffer, request, { level: 0.95, bounds, seed, facts });
      const inside = (x, ci) => ci.low <= x + 1e-12 && x - 1e-12 <= ci.high;
      [
        inside(exact.quantiles[0].value, risk.quantiles[0]),
        inside(exact.tailMean.value, risk.tail.dkw),
        inside(exact.tailMean.value, risk.tail.bootstrap),
        inside(exact.events[0].probability, risk.events[0].clopperPearson),
        inside(exact.events[0].probability, risk.events[0].wilson),
        inside(exact.events[1].probability, risk.events[1].clopperPearson),
        inside(exact.events[1].probability, risk.events[1].wilson),
      ].forEach((hit, k) => (hits[k] += hit ? 1 : 0));
    }
    console.log(`| ${n} | ${tail} | ${n * tail} | ${hits.map((h) => (h / seeds).toFixed(3)).join(' | ')} |`);
  }
}
console.log(`\n${seeds} seeds a row, 95% intervals; exact values from the enumerated return distribution.`);
