// The benchmark's trials as data. Each trial is one child-process run of trial.mjs (the `run`
// object is what it receives); index.mjs repeats every trial and reports medians. Episode
// counts are fixed per workload, the same for the engine and both reference loops.
import path from 'node:path';
import { WORKLOADS, RUN_SEED } from './workloads.mjs';

/** Sizes for "time per episode against the number of states", all with episodes of about 120 steps. */
export const STATE_COUNTS = [100, 1_000, 10_000, 100_000];
/** Horizons for "time per episode against the horizon", on a 400-state MDP without terminal states. */
export const HORIZONS = [10, 100, 1_000, 10_000];
/**
 * Workloads rerun longer (episodes × factor) to measure how throughput scales with workers.
 * The module rows are sized so one worker takes over 2 s on a quiet machine (d1 about 2.4 s,
 * d2 about 2.2 s), the length the scaling target is stated for.
 */
export const THROUGHPUT_FACTORS = [['a', 5], ['b', 3], ['d1', 16], ['d2', 10]];
/**
 * The module rows again with the process pinned by `taskset`: all workers on one core and on
 * two, and one worker on one core. Within one bench run and interleaved, their ratios show
 * what the second core buys and what the pool costs when there is none, even on a machine
 * whose other work makes single wall times unreliable.
 */
export const PINNED = [
  { label: '1 worker, core 0', cpus: '0', workers: 1 },
  { label: '2 workers, core 0', cpus: '0', workers: 2 },
  { label: '2 workers, cores 0,1', cpus: '0,1', workers: 2 },
];
export const PINNED_WORKLOADS = ['d1', 'd2'];
/** Every trial group, for `--only`. */
export const TRIAL_GROUPS = ['workload', 'throughput', 'pinned', 'states', 'horizon', 'memory', 'sequence', 'analysis', 'commands', 'store', 'startup'];
/** Episodes a policy for the analysis trials: each figure computed after sampling, timed alone. */
export const ANALYSIS_EPISODES = [10_000, 100_000, 1_000_000];
/** Episodes a policy for the whole-command trials of the analysis goals. */
export const COMMAND_EPISODES = 1_000_000;
/** Episode counts for the memory trials: peak memory should grow by the 8 bytes an episode keeps. */
export const MEMORY_EPISODES = [200_000, 1_200_000];

/**
 * @param prepared  workloads from prepareWorkloads (with definition paths and exported tables)
 * @param scaling   exported tables for the scaling trials: { states: {n: file}, horizons: {h: file} }
 * @param cores     worker count for the "all workers" trials
 * @param binary    the compiled C loop, or null when there is no compiler
 * @param root      the repository root
 */
export function buildTrials({ prepared, scaling, cores, binary, root, pin = false }) {
  const trials = [];
  const seed = RUN_SEED;
  for (const w of prepared) {
    const base = { env: w.env, policy: w.policy, seed, episodes: w.episodes };
    trials.push({ group: 'workload', workload: w.id, runnerLabel: 'engine-1', run: { runner: 'engine', ...base, workers: 1 } });
    trials.push({ group: 'workload', workload: w.id, runnerLabel: 'engine-all', run: { runner: 'engine', ...base, workers: cores } });
    if (w.table && binary) trials.push({ group: 'workload', workload: w.id, runnerLabel: 'c', run: { runner: 'c', binary, table: w.table, seed, episodes: w.episodes } });
    if (w.table) trials.push({ group: 'workload', workload: w.id, runnerLabel: 'naive', run: { runner: 'naive', ...base } });
  }
  // Worker scaling needs runs long enough that starting threads and warming their JIT is a
  // small part: the same workloads with more episodes, engine only, no separate cold run.
  for (const [id, factor] of THROUGHPUT_FACTORS) {
    const w = prepared.find((x) => x.id === id);
    if (!w) continue;
    const base = { env: w.env, policy: w.policy, seed, episodes: w.episodes * factor, cold: false };
    trials.push({ group: 'throughput', workload: id, runnerLabel: 'engine-1', run: { runner: 'engine', ...base, workers: 1 } });
    trials.push({ group: 'throughput', workload: id, runnerLabel: 'engine-all', run: { runner: 'engine', ...base, workers: cores } });
    if (pin && PINNED_WORKLOADS.includes(id)) {
      for (const p of PINNED) trials.push({ group: 'pinned', workload: id, runnerLabel: p.label, pin: p.cpus, run: { runner: 'engine', ...base, workers: p.workers } });
    }
  }
  for (const states of STATE_COUNTS) {
    const table = scaling.states[states];
    const episodes = 10_000;
    trials.push({ group: 'states', size: states, runnerLabel: 'engine-1', run: { runner: 'loop', table, seed, episodes } });
    if (binary) trials.push({ group: 'states', size: states, runnerLabel: 'c', run: { runner: 'c', binary, table, seed, episodes } });
  }
  for (const horizon of HORIZONS) {
    const table = scaling.horizons[horizon];
    const episodes = Math.round(1_000_000 / horizon);
    trials.push({ group: 'horizon', size: horizon, runnerLabel: 'engine-1', run: { runner: 'loop', table, seed, episodes } });
    if (binary) trials.push({ group: 'horizon', size: horizon, runnerLabel: 'c', run: { runner: 'c', binary, table, seed, episodes } });
  }
  const short = prepared.find((w) => w.id === 'c');
  for (const episodes of MEMORY_EPISODES) {
    const base = { env: short.env, policy: short.policy, seed, episodes, workers: cores };
    trials.push({ group: 'memory', size: episodes, runnerLabel: 'engine, blocks dropped', run: { runner: 'episodes', ...base, keep: false } });
    trials.push({ group: 'memory', size: episodes, runnerLabel: 'engine, returns kept', run: { runner: 'episodes', ...base, keep: true } });
    trials.push({ group: 'memory', size: episodes, runnerLabel: 'estimate (runEstimate, t)', run: { runner: 'estimate', ...base } });
  }
  // A target-error run's sequence, fed one return at a time and checked after each, as the run does.
  for (const method of ['betting', 'empirical-bernstein']) {
    trials.push({ group: 'sequence', size: 1_000_000, runnerLabel: method, run: { runner: 'sequence', method, episodes: 1_000_000, seed } });
  }
  const demo = { env: path.join(root, 'envs', 'warehouse.json'), direct: path.join(root, 'envs', 'picker-direct.json'), careful: path.join(root, 'envs', 'picker-careful.json') };
  for (const episodes of ANALYSIS_EPISODES) {
    trials.push({ group: 'analysis', size: episodes, runnerLabel: 'steps', run: { runner: 'analysis', env: demo.env, policies: [demo.direct, demo.careful], seed, episodes, workers: cores } });
  }
  // The commands a user runs, whole (start-up, sampling, analysis, report), without the store.
  const cli = path.join(root, 'dist', 'cli', 'main.js');
  const common = ['--env', demo.env, '--episodes', String(COMMAND_EPISODES), '--seed', String(seed), '--no-store', '--json'];
  const commands = {
    'estimate --ci t (direct)': ['estimate', ...common, '--policy', demo.direct],
    'estimate --ci t (careful)': ['estimate', ...common, '--policy', demo.careful],
    'estimate --ci bootstrap (direct)': ['estimate', ...common, '--policy', demo.direct, '--ci', 'bootstrap'],
    'compare (direct, careful)': ['compare', ...common, '--policy', demo.direct, '--policy', demo.careful],
  };
  for (const [label, argv] of Object.entries(commands)) {
    trials.push({ group: 'commands', size: COMMAND_EPISODES, runnerLabel: label, run: { runner: 'command', argv: [process.execPath, cli, ...argv] } });
  }
  trials.push({ group: 'store', size: 1_000_000, runnerLabel: 'store', run: { runner: 'store', episodes: 1_000_000, chunk: 16_384, seed } });
  const main = path.join(root, 'dist', 'cli', 'main.js');
  trials.push({ group: 'startup', runnerLabel: 'reckon --help', run: { runner: 'command', argv: [process.execPath, main, '--help'] } });
  trials.push({ group: 'startup', runnerLabel: 'node -e 0', run: { runner: 'command', argv: [process.execPath, '-e', '0'] } });
  return trials;
}

export { WORKLOADS };
