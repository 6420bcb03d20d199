#!/usr/bin/env node
// `npm run bench`: the engine against a plain C loop and a naive JavaScript loop on the same
// workloads and episode counts, plus scaling, memory, storage and start-up. Every trial runs
// in a fresh child process (trial.mjs) and is repeated; tables show medians, and the same
// figures (with every repeat) are written as JSON to bench-results/.
//
// Usage: npm run build && node scripts/bench/index.mjs [--repeats 3] [--only GROUP|WORKLOAD,...]
//        [--skip-pin] [--render FILE]
// Groups: workload, throughput, states, horizon, memory, store, sequence, analysis, commands,
// startup; a workload id (a, b, c, d1, d2, d3) selects that workload's rows of the workload and
// throughput tables, so `--only d1,d2` gives the code environments' rows alone.
// The tables end with where each thread's time went in the long runs (start-up, busy share,
// idle, its own CPU, time queued for a core), and the module rows run again pinned by taskset
// (all workers on one core, on two, and one worker on one core; --skip-pin leaves them out,
// as does a machine without taskset). --render FILE prints the tables of a saved run
// (bench-results/bench-latest.json) again, without running anything.
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { availableParallelism, cpus, loadavg, totalmem, type as osType, release } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.resolve(HERE, '../..');

const { values: args } = parseArgs({
  options: {
    repeats: { type: 'string', default: '3' },
    only: { type: 'string' },
    out: { type: 'string', default: path.join(ROOT, 'bench-results') },
    'skip-pin': { type: 'boolean', default: false },
    render: { type: 'string' },
  },
});
if (args.render) {
  // Tables again from a saved run (its JSON), without running anything.
  const { readFileSync } = await import('node:fs');
  const report = await import('./report.mjs');
  const saved = JSON.parse(readFileSync(args.render, 'utf8'));
  const summary = report.summarise(saved.trials, saved.summary.workloads, saved.machine);
  process.stdout.write(report.render(summary) + report.renderThreads(summary));
  process.exit(0);
}
const repeats = Number(args.repeats);
if (!(Number.isInteger(repeats) && repeats >= 1)) throw new Error(`bench: --repeats must be a positive integer, got ${args.repeats}`);
if (!existsSync(path.join(ROOT, 'dist', 'engine', 'pool.js'))) {
  console.error('bench: dist/ is missing; run `npm run build` first');
  process.exit(2);
}

// Imported after the check above: they load the compiled engine.
const { prepareWorkloads } = await import('./workloads.mjs');
const { buildTrials, TRIAL_GROUPS, STATE_COUNTS, HORIZONS } = await import('./trials.mjs');
const { compiledMdp, randomMdpRows, uniformPolicyMatrix } = await import('./random-mdp.mjs');
const { writeFiniteMdp } = await import('./export-mdp.mjs');
const report = await import('./report.mjs');

const began = performance.now();
const outDir = path.resolve(args.out);
const scratch = path.join(outDir, 'workloads');
mkdirSync(scratch, { recursive: true });

/** Compiles rollout.c with the machine's cc; null (and a note) when there is no compiler. */
function compileC() {
  const binary = path.join(outDir, 'rollout-c');
  try {
    execFileSync('cc', ['-O2', '-ffp-contract=off', '-o', binary, path.join(HERE, 'rollout.c'), '-lm'], { stdio: ['ignore', 'ignore', 'pipe'] });
    const version = execFileSync('cc', ['--version'], { encoding: 'utf8' }).split('\n')[0];
    return { binary, note: `cc -O2 -ffp-contract=off (${version})` };
  } catch (e) {
    return { binary: null, note: `C loop skipped: could not compile with cc (${e.code === 'ENOENT' ? 'no cc on this machine' : String(e.stderr ?? e.message).trim().split('\n')[0]})` };
  }
}

/** The random MDPs of the scaling trials, as exported tables (reused while their recipe is unchanged). */
function scalingTables() {
  const states = {};
  for (const n of STATE_COUNTS) {
    const file = path.join(scratch, `states-${n}-v1.mdp`);
    if (!existsSync(file)) writeFiniteMdp(file, compiledMdp(randomMdpRows({ states: n, terminalChance: 0.008, seed: 2024 }), { discount: 0.99, horizon: 400 }), uniformPolicyMatrix(n, 4));
    states[n] = file;
  }
  const horizons = {};
  const endless = randomMdpRows({ states: 400, terminals: 0, terminalChance: 0, seed: 2024 });
  for (const h of HORIZONS) {
    const file = path.join(scratch, `endless-400-h${h}-v1.mdp`);
    if (!existsSync(file)) writeFiniteMdp(file, compiledMdp(endless, { discount: 0.99, horizon: h }), uniformPolicyMatrix(400, 4));
    horizons[h] = file;
  }
  return { states, horizons };
}

/** Runs one trial in a fresh process (under `taskset -c CPUS` when the trial is pinned). */
function runTrial(trial) {
  const argv = [process.execPath, path.join(HERE, 'trial.mjs'), JSON.stringify(trial.run)];
  if (trial.pin) argv.unshift('taskset', '-c', trial.pin);
  try {
    const out = execFileSync(argv[0], argv.slice(1), {
      encoding: 'utf8',
      stdio: ['ignore', 'pipe', 'pipe'],
      timeout: 120_000,
    });
    return JSON.parse(out.trim().split('\n').pop());
  } catch (e) {
    // The error's own line (not Node's stack and version footer) is what says what went wrong.
    const lines = String(e.stderr || e.message).split('\n').map((l) => l.trim()).filter(Boolean);
    return { error: lines.find((l) => /Error|error:/.test(l)) ?? lines[0] ?? 'no output' };
  }
}

function hasTaskset() {
  try {
    execFileSync('taskset', ['-c', '0', process.execPath, '-e', '0'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

const cores = availableParallelism();
const c = compileC();
const prepared = await prepareWorkloads(scratch);
const scaling = scalingTables();
const only = args.only ? new Set(args.only.split(',').map((x) => x.trim())) : null;
const workloadIds = new Set(prepared.map((w) => w.id));
if (only) {
  const unknown = [...only].filter((x) => !workloadIds.has(x) && !TRIAL_GROUPS.includes(x));
  if (unknown.length) {
    console.error(`bench: --only: unknown ${unknown.join(', ')} (groups: ${TRIAL_GROUPS.join(', ')}; workloads: ${[...workloadIds].join(', ')})`);
    process.exit(2);
  }
}
const pin = !args['skip-pin'] && hasTaskset();
if (!args['skip-pin'] && !pin) console.error('bench: no taskset (util-linux) on this machine, so no pinned rows');
/** A trial is selected by its group, or by its workload for the workload, throughput and pinned rows. */
const selected = (t) => !only || only.has(t.group) || (t.workload !== undefined && only.has(t.workload));
const trials = buildTrials({ prepared, scaling, cores, binary: c.binary, root: ROOT, pin }).filter(selected);
const loadBefore = loadavg();
console.error(`bench: ${trials.length} trials x ${repeats} repeats, each in a fresh process (set-up took ${((performance.now() - began) / 1000).toFixed(1)} s)`);

// Repeats are interleaved (every trial once, then again), so a noisy spell hits all trials alike.
for (const t of trials) t.runs = [];
for (let r = 0; r < repeats; r++) {
  for (const t of trials) {
    t.runs.push(runTrial(t));
    // Start-up is cheap and the noisiest: twice the repeats.
    if (t.group === 'startup') t.runs.push(runTrial(t));
  }
  console.error(`bench: repeat ${r + 1}/${repeats} done at ${((performance.now() - began) / 1000).toFixed(0)} s`);
}

const machine = {
  date: new Date().toISOString(),
  cpu: cpus()[0]?.model ?? 'unknown',
  cores,
  memoryGb: Math.round(totalmem() / 2 ** 30),
  os: `${osType()} ${release()}`,
  node: process.version,
  c: c.note,
  loadAverageBefore: loadBefore.map((x) => Number(x.toFixed(2))),
  loadAverageAfter: loadavg().map((x) => Number(x.toFixed(2))),
  repeats,
  seconds: Number(((performance.now() - began) / 1000).toFixed(1)),
};
const summary = report.summarise(trials, prepared, machine);
const text = report.render(summary) + report.renderThreads(summary);
process.stdout.write(text);
const stamp = machine.date.replace(/[:.]/g, '-');
const json = JSON.stringify({ machine, summary, trials: trials.map(({ run, ...rest }) => ({ ...rest, run })) }, null, 2);
writeFileSync(path.join(outDir, `bench-${stamp}.json`), json);
writeFileSync(path.join(outDir, 'bench-latest.json'), json);
writeFileSync(path.join(outDir, 'bench-latest.md'), text);
console.error(`bench: wrote ${path.relative(process.cwd(), path.join(outDir, 'bench-latest.json'))} and bench-latest.md (${machine.seconds} s in all)`);
