#!/usr/bin/env node
// Why the engine seeds every episode with xoshiro128** (src/engine/streams.ts) rather than with
// mt19937: measures the cost of preparing an episode's generator and the draw rate of each.
//
// Usage: npm run build && node scripts/bench-seeding.mjs [--repeats 5]
// Each trial runs in a fresh child process (no JIT state shared between trials) and is repeated;
// the table shows the median and the range. Inputs are fixed; every loop folds its draws into a
// checksum that is printed, so the work cannot be optimised away.
import { execFileSync } from 'node:child_process';
import { cpus } from 'node:os';
import { fileURLToPath } from 'node:url';
import mt19937 from '@stdlib/random-base-mt19937';
import { Xoshiro128 } from '../dist/engine/xoshiro128.js';
import { seedStream, STREAM } from '../dist/engine/streams.js';

/** Trials as data: `run` returns how many operations it did and a checksum of their results. */
const TRIALS = [
  {
    name: 'xoshiro128** seedStream (re-seed in place)',
    unit: 'ns / episode',
    run() {
      const episodes = 5_000_000;
      const rng = new Xoshiro128();
      let checksum = 0;
      for (let episode = 0; episode < episodes; episode++) {
        seedStream(rng, 20240601, STREAM.ENV, episode);
        checksum ^= rng.s0;
      }
      return { operations: episodes, checksum };
    },
  },
  {
    name: 'mt19937 factory({ seed }) (new generator)',
    unit: 'ns / episode',
    run() {
      const episodes = 50_000;
      let checksum = 0;
      for (let episode = 0; episode < episodes; episode++) {
        const rng = mt19937.factory({ seed: episode + 1 });
        checksum ^= rng();
      }
      return { operations: episodes, checksum };
    },
  },
  {
    name: 'xoshiro128** uint32()',
    unit: 'M draws / s',
    run() {
      const draws = 50_000_000;
      const rng = new Xoshiro128();
      seedStream(rng, 20240601, STREAM.ENV, 0);
      let checksum = 0;
      for (let i = 0; i < draws; i++) checksum ^= rng.uint32();
      return { operations: draws, checksum };
    },
  },
  {
    name: 'mt19937 () (uint32)',
    unit: 'M draws / s',
    run() {
      const draws = 50_000_000;
      const rng = mt19937.factory({ seed: 20240601 });
      let checksum = 0;
      for (let i = 0; i < draws; i++) checksum ^= rng();
      return { operations: draws, checksum };
    },
  },
  {
    name: 'xoshiro128** uniform() (32-bit resolution, 1 word)',
    unit: 'M draws / s',
    run() {
      const draws = 50_000_000;
      const rng = new Xoshiro128();
      seedStream(rng, 20240601, STREAM.ENV, 0);
      let sum = 0;
      for (let i = 0; i < draws; i++) sum += rng.uniform();
      return { operations: draws, checksum: sum };
    },
  },
  {
    name: 'mt19937 .normalized() (53-bit resolution, 2 words)',
    unit: 'M draws / s',
    run() {
      const draws = 50_000_000;
      const rng = mt19937.factory({ seed: 20240601 });
      let sum = 0;
      for (let i = 0; i < draws; i++) sum += rng.normalized();
      return { operations: draws, checksum: sum };
    },
  },
];

function runTrialHere(index) {
  const trial = TRIALS[index];
  const started = process.hrtime.bigint();
  const { operations, checksum } = trial.run();
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  const value = trial.unit === 'ns / episode' ? (seconds * 1e9) / operations : operations / seconds / 1e6;
  process.stdout.write(JSON.stringify({ value, checksum }));
}

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function format(value) {
  return value >= 100 ? value.toFixed(0) : value >= 10 ? value.toFixed(1) : value.toFixed(2);
}

function main(repeats) {
  const script = fileURLToPath(import.meta.url);
  const results = TRIALS.map((trial, index) => {
    const values = [];
    for (let r = 0; r < repeats; r++) {
      const out = JSON.parse(execFileSync(process.execPath, [script, '--trial', String(index)], { encoding: 'utf8' }));
      values.push(out.value);
    }
    return { ...trial, median: median(values), min: Math.min(...values), max: Math.max(...values) };
  });

  console.log(`bench-seeding: ${new Date().toISOString()}, Node ${process.version}, ${cpus()[0]?.model ?? 'unknown CPU'} (${cpus().length} cores), ${repeats} runs each, fresh process per run`);
  const nameWidth = Math.max(...results.map((r) => r.name.length));
  console.log(`${'trial'.padEnd(nameWidth)}  ${'median'.padStart(8)}  ${'range'.padStart(17)}  unit`);
  for (const r of results) {
    console.log(`${r.name.padEnd(nameWidth)}  ${format(r.median).padStart(8)}  ${`${format(r.min)}..${format(r.max)}`.padStart(17)}  ${r.unit}`);
  }
  const [reseed, construct, xoUint, mtUint, xoUniform, mtUniform] = results.map((r) => r.median);
  console.log('');
  console.log(`episode set-up: mt19937 construction costs ${format(construct / reseed)}x a xoshiro128** re-seed`);
  console.log(`uint32 draws:   xoshiro128** is ${format(xoUint / mtUint)}x the rate of mt19937`);
  console.log(`uniform draws:  xoshiro128** is ${format(xoUniform / mtUniform)}x the rate of mt19937 .normalized() (which uses two words)`);
}

const trialFlag = process.argv.indexOf('--trial');
if (trialFlag >= 0) {
  runTrialHere(Number(process.argv[trialFlag + 1]));
} else {
  const repeatsFlag = process.argv.indexOf('--repeats');
  main(repeatsFlag >= 0 ? Number(process.argv[repeatsFlag + 1]) : 5);
}
