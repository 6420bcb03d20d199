// One timed trial in a fresh process (so no JIT state or heap carries over between trials):
// `node trial.mjs '<json>'` runs the trial the JSON describes and prints one JSON line: wall and
// CPU seconds of the timed part, the work done (episodes, steps), a checksum of the returns
// (checksum.mjs) and the process's peak resident memory. Modules are imported per runner, so
// a trial loads only what it times.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { ReturnsChecksum } from './checksum.mjs';

/** Times `work` (sync or async): wall and process CPU seconds. */
async function timed(work) {
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const result = await work();
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  return { result, seconds, cpuSeconds: (cpu.user + cpu.system) / 1e6 };
}

async function specOf(env, policy, seed) {
  const { readDefinitionFile } = await import('../../dist/definitions/index.js');
  return { env: readDefinitionFile(env), policy: readDefinitionFile(policy), seed, start: null };
}

const RUNNERS = {
  /**
   * The engine as the command line runs it: definition files in, runEpisodes on K workers.
   * Two timed runs of the same length: a cold one (episodes [E, 2E), V8 still compiling the
   * loop, as a user's run starts) and then the reported warm one (episodes [0, E), the same
   * as the reference loops; the C loop is compiled before it is timed, too). Worker threads
   * are new in each run, so their own warm-up is in both.
   */
  async engine({ env, policy, seed, episodes, workers, cold: withCold = true }) {
    const { runEpisodes } = await import('../../dist/engine/pool.js');
    const { prepareRollout } = await import('../../dist/engine/prepare.js');
    const spec = await specOf(env, policy, seed);
    // Parsing and compiling the definitions is timed apart, as the C loop's loading is not timed.
    const load = await timed(() => prepareRollout(spec));
    const run = (first, check) =>
      timed(() => runEpisodes(spec, { first, count: episodes, workers, prepared: load.result, onBlock: (b) => check.add(b.returns, b.lengths) }));
    const cold = withCold ? await run(episodes, new ReturnsChecksum()) : { seconds: null, result: { steps: null } };
    const check = new ReturnsChecksum();
    const { result, seconds, cpuSeconds } = await run(0, check);
    return {
      seconds,
      cpuSeconds,
      coldSeconds: cold.seconds,
      coldSteps: cold.result.steps,
      loadSeconds: load.seconds,
      steps: result.steps,
      episodes: result.episodes,
      sum: check.sum,
      hash: check.hash,
      threads: result.threads,
    };
  },

  /** The C loop on the exported tables (built by the parent). */
  c({ binary, table, seed, episodes }) {
    return JSON.parse(execFileSync(binary, [table, String(seed), '0', String(episodes)], { encoding: 'utf8' }));
  },

  /** The loop over objects (naive-loop.mjs). */
  async naive({ env, policy, seed, episodes }) {
    const { compile } = await import('./workloads.mjs');
    const { objectModel, runNaive } = await import('./naive-loop.mjs');
    const built = await compile({ env, policy });
    const model = objectModel(built.env.mdp, built.policy.matrix);
    const { result, seconds, cpuSeconds } = await timed(() => runNaive(model, seed, 0, episodes));
    const check = new ReturnsChecksum();
    check.add(result.returns, result.lengths);
    return { seconds, cpuSeconds, steps: result.steps, episodes, sum: check.sum, hash: check.hash };
  },

  /** The engine's loop alone (rolloutFinite, one thread) on exported tables: for sizes whose files would take longer to parse than to run. Warm, as `engine`. */
  async loop({ table, seed, episodes }) {
    const { rolloutFinite } = await import('../../dist/engine/finite-rollout.js');
    const { newBlock } = await import('../../dist/engine/episode-block.js');
    const { readFiniteMdp } = await import('./export-mdp.mjs');
    const { mdp, policy, start } = readFiniteMdp(table);
    const blockSize = 4096;
    const run = (first, check) => {
      let total = 0;
      for (let done = 0; done < episodes; done += blockSize) {
        const block = newBlock(first + done, Math.min(blockSize, episodes - done));
        total += rolloutFinite(mdp, policy, seed, start, block);
        check.add(block.returns, block.lengths);
      }
      return total;
    };
    const cold = await timed(() => run(episodes, new ReturnsChecksum()));
    const check = new ReturnsChecksum();
    const { result: steps, seconds, cpuSeconds } = await timed(() => run(0, check));
    return { seconds, cpuSeconds, coldSeconds: cold.seconds, coldSteps: cold.result, steps, episodes, sum: check.sum, hash: check.hash };
  },

  /**
   * The engine on all workers, its blocks either dropped (`keep` false: memory should not
   * grow with the episodes at all) or their returns kept in one preallocated array, as an
   * estimate keeps them for re-analysis (8 bytes an episode). Both copy in onBlock, so they
   * let the pool reuse block memory (`reuseBlocks`), as runEstimate does.
   */
  async episodes({ env, policy, seed, episodes, workers, keep }) {
    const { runEpisodes } = await import('../../dist/engine/pool.js');
    const spec = await specOf(env, policy, seed);
    const kept = keep ? new Float64Array(episodes) : null;
    const { result, seconds, cpuSeconds } = await timed(() =>
      runEpisodes(spec, { first: 0, count: episodes, workers, reuseBlocks: true, onBlock: (b) => kept?.set(b.returns, b.first) }),
    );
    return { seconds, cpuSeconds, steps: result.steps, episodes: result.episodes };
  },

  /** A whole estimate (runEstimate: returns kept, t interval): peak memory against the episode count. */
  async estimate({ env, policy, seed, episodes, workers }) {
    const { runEstimate } = await import('../../dist/evaluate/estimate.js');
    const spec = await specOf(env, policy, seed);
    const request = { spec, episodes, workers, method: 't', level: 0.95, bounds: null, targetError: null };
    const { result, seconds, cpuSeconds } = await timed(() => runEstimate(request));
    return { seconds, cpuSeconds, steps: result.steps, episodes: result.episodes, mean: result.mean };
  },

  /** Storing `episodes` episodes in a fresh run store (src/store), in chunks the size of engine blocks, then reading them back. */
  async store({ episodes, chunk, seed }) {
    const { openStore } = await import('../../dist/store/open.js');
    const { createRun, appendChunk, finishRun, loadEpisodes, findRun } = await import('../../dist/store/runs.js');
    const dir = mkdtempSync(path.join(tmpdir(), 'reckon-bench-store-'));
    try {
      const file = path.join(dir, 'runs.sqlite');
      const db = openStore(file);
      const definition = { label: 'bench', json: {}, baseDir: dir, hash: 'bench' };
      const runId = createRun(db, {
        kind: 'estimate', env: definition, policy: definition, seed, start: null, firstEpisode: 0, episodesRequested: episodes,
        options: {}, facts: {}, toolVersion: 'bench', machine: {},
      });
      // Returns and lengths made up front (not timed): what the engine would have delivered.
      const returns = Float64Array.from({ length: episodes }, (_, i) => Math.sin(i) * 10);
      const lengths = Uint32Array.from({ length: episodes }, (_, i) => 10 + (i % 7));
      const write = await timed(() => {
        for (let first = 0; first < episodes; first += chunk) {
          const end = Math.min(episodes, first + chunk);
          appendChunk(db, runId, { first, returns: returns.subarray(first, end), lengths: lengths.subarray(first, end) }, 0, 0);
        }
        finishRun(db, runId, 'done');
      });
      const read = await timed(() => loadEpisodes(db, findRun(db, runId)));
      const same = read.result.returns.every((r, i) => r === returns[i]);
      db.close();
      const bytes = ['', '-wal'].reduce((n, suffix) => n + (statSync(file + suffix, { throwIfNoEntry: false })?.size ?? 0), 0);
      return { seconds: write.seconds, cpuSeconds: write.cpuSeconds, readSeconds: read.seconds, episodes, bytes, roundTrip: same };
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  },

  /**
   * Each figure computed after sampling, timed on its own on the returns of two policies (the
   * demo's, `episodes` each, sampled first and not timed), in the order a report computes
   * them. Cold: a fresh process, as a user's run meets them.
   */
  async analysis({ env, policies, seed, episodes, workers }) {
    const { runEpisodes } = await import('../../dist/engine/pool.js');
    const stats = await import('../../dist/stats/index.js');
    const { probabilityOfImprovementInterval } = await import('../../dist/stats/probability-of-improvement.js');
    const { interquartileMeanInterval } = await import('../../dist/stats/interquartile-mean-interval.js');
    const { rankByMean } = await import('../../dist/stats/policy-ranking.js');
    const samples = [];
    for (const policy of policies) {
      const spec = await specOf(env, policy, seed);
      const returns = new Float64Array(episodes);
      await runEpisodes(spec, { first: 0, count: episodes, workers, onBlock: (b) => returns.set(b.returns, b.first) });
      samples.push(returns);
    }
    await new Promise((resolve) => setTimeout(resolve, 300)); // let the worker threads exit first
    const [a, b] = samples;
    const level = 0.95;
    const options = { seed, resamples: stats.DEFAULT_RESAMPLES };
    const steps = {};
    const step = async (name, work) => {
      const { seconds } = await timed(work);
      steps[name] = seconds;
    };
    let summary;
    await step('summary + t interval', () => {
      summary = stats.summarize(a);
      return stats.tInterval(summary, level);
    });
    await step('bootstrap (BCa)', () => stats.bcaBootstrapInterval(a, summary, level, options));
    await step('bootstrap-percentile', () => stats.percentileBootstrapInterval(a, summary, level, options));
    await step('paired difference, t', () => stats.comparePair(a, b, { level, method: 't' }));
    await step('paired difference, BCa', () => stats.comparePair(a, b, { level, method: 'bootstrap', ...options }));
    await step('probability of improvement', () => probabilityOfImprovementInterval(a, b, level));
    await step('IQM + stratified bootstrap', () => interquartileMeanInterval([a], level, options));
    await step('Holm + ranking', () => {
      stats.holmAdjust([0.01, 0.2, 0.03]);
      return rankByMean([stats.summarize(a).mean, stats.summarize(b).mean]);
    });
    const distinct = new Set(a).size;
    return { seconds: Object.values(steps).reduce((x, y) => x + y, 0), steps, episodes, distinct };
  },

  /**
   * One target-error sequence over `episodes` returns made up front (not timed; Bernoulli(0.1)
   * on the engine's streams): add one return, check the half-width, as runEstimate does, then
   * the final report (the betting sequence's refined endpoints).
   */
  async sequence({ method, episodes, seed }) {
    const { makeRunningInterval, sequenceInterval } = await import('../../dist/evaluate/sequence.js');
    const { streamFor } = await import('../../dist/engine/streams.js');
    const rng = streamFor(seed, 11, 0);
    const returns = Float64Array.from({ length: episodes }, () => (rng.uniform() < 0.1 ? 1 : 0));
    // a target reached near the end: bets tuned to about this many episodes; every episode is fed and checked
    const settings = { method, level: 0.95, bounds: [0, 1], sigma: null, targetError: 7e-4 };
    const { result, seconds, cpuSeconds } = await timed(() => {
      const sequence = makeRunningInterval(settings);
      const one = new Float64Array(1);
      let narrowest = Infinity;
      for (let i = 0; i < episodes; i++) {
        one[0] = returns[i];
        sequence.add(one);
        narrowest = Math.min(narrowest, sequence.interval().halfWidth);
      }
      return { narrowest, final: sequenceInterval(sequence, settings, false, 0).halfWidth, rebuilds: sequence.rebuilds ?? null };
    });
    return { seconds, cpuSeconds, episodes, halfWidth: result.final, rebuilds: result.rebuilds };
  },

  /** Wall time of a command started from scratch (e.g. `reckon --help`). */
  async command({ argv }) {
    const { seconds, cpuSeconds } = await timed(() => execFileSync(argv[0], argv.slice(1), { stdio: ['ignore', 'ignore', 'inherit'] }));
    return { seconds, cpuSeconds };
  },
};

const trial = JSON.parse(process.argv[2]);
const result = await RUNNERS[trial.runner](trial);
// maxRSS is in kilobytes and covers every thread of this process (workers included).
const maxRssMb = result.maxRssMb ?? process.resourceUsage().maxRSS / 1024;
process.stdout.write(`${JSON.stringify({ ...result, maxRssMb })}\n`);
