#!/usr/bin/env node
/**
 * The process bridge against Python alone (run after `npm run build`; part of `npm run bench`).
 *
 * One trivial environment (a picker walking an aisle of 40 bays: advance or wait, -0.01 a
 * step, +1 at the packing end) is timed four ways, each in a fresh process, rounds interleaved:
 *
 * - step path: reckon's uniform policy drives it (`reckon estimate`, 1 and 2 workers), against
 *   the same environment looped in Python alone with random actions;
 * - episode path: a policy of the script acts (`{"kind": "process"}`), against the helper's
 *   own episode loop called directly in Python, with the very seeds reckon sends (the returns
 *   must agree).
 *
 * Run sizes are set from pilots of the loops alone: the step path for about BENCH_SECONDS (6)
 * of Python alone; the episode path at two lengths, a short run (about 1.5 s of Python alone)
 * and a run of realistic length (about BENCH_SECONDS), since a fixed start-up cost weighs on
 * the first and hardly on the second. Wall time and CPU time (user + system of the whole
 * process tree, from wait4) are both recorded, because the machines this runs on are shared:
 * a wall-clock ratio says what a user waits, a CPU-time ratio what the bridge costs whatever
 * else is running. Medians of the rounds. BENCH_BEFORE=DIR also times the episode path with
 * another build of reckon (DIR/dist/cli/main.js), interleaved, for a before/after in one run.
 * Writes bench-results/bench-python.json and prints the README's table.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir, cpus } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const CLI = path.join(ROOT, 'dist/cli/main.js');
const { episodeSeed } = await import(path.join(ROOT, 'dist/engine/process-seeds.js'));
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3);
const TARGET_SECONDS = Number(process.env.BENCH_SECONDS ?? 6);
const SEED = 1;

const dir = mkdtempSync(path.join(tmpdir(), 'reckon-bench-python-'));
const write = (name, text) => writeFileSync(path.join(dir, name), text);

write('aisle_env.py', `
import random
from reckon_bridge import serve

class Aisle:
    """A picker walks an aisle of bays to the packing end: -0.01 a step, +1 on arrival."""
    actions = ["wait", "advance"]
    discount = 0.99
    horizon = 400
    reward_bounds = (-0.01, 1.0)

    def __init__(self, options):
        self.bays = int(options.get("bays", 40))
        self.position = 0

    def reset(self, seed=None):
        self.position = 0
        return 0, {}

    def step(self, action):
        self.position += action
        arrived = self.position >= self.bays
        return self.position, 1.0 if arrived else -0.01, arrived, False, {}

class Walker:
    def act(self, observation, rng):
        return 1 if rng.random() < 0.5 else 0

if __name__ == "__main__":
    serve(Aisle, policies={"walker": lambda options, actions: Walker()})
`);

// The same loops without reckon. "steps": the environment with random actions; "episodes":
// the helper's own episode loop, fed the seeds reckon would send.
write('alone.py', `
import json, random, sys, time
sys.path.insert(0, ${JSON.stringify(path.join(ROOT, 'python'))})
import reckon_bridge
from aisle_env import Aisle, Walker

mode, count = sys.argv[1], int(sys.argv[2])
if mode == "steps":
    env = Aisle({})
    rng = random.Random(12345)
    steps = 0
    start = time.perf_counter()
    for episode in range(count):
        env.reset(seed=episode)
        for t in range(400):
            steps += 1
            if env.step(1 if rng.random() < 0.5 else 0)[2]:
                break
    seconds = time.perf_counter() - start
    print(json.dumps({"seconds": seconds, "steps": steps}))
else:
    items = json.load(open(sys.argv[3]))
    bridge = reckon_bridge._Bridge(Aisle, {"walker": lambda options, actions: Walker()})
    bridge.open({"reckon": reckon_bridge.PROTOCOL, "options": {}})
    bridge.policy({"name": "walker", "options": {}})
    returns, lengths = [], []
    def keep(part):
        returns.extend(part["returns"]); lengths.extend(part["lengths"])
    start = time.perf_counter()
    keep(bridge.episodes({"policy": "walker", "items": items}, keep))
    seconds = time.perf_counter() - start
    print(json.dumps({"seconds": seconds, "steps": sum(lengths), "episodes": len(returns), "returns_sum": sum(returns)}))
`);

// Runs a command and reports its wall time and the CPU time of its whole process tree. It
// makes itself the subreaper of its descendants (Linux), so a program reckon ended without
// waiting for it is still waited for here and its CPU counted.
write('cpu_time.py', `
import ctypes, json, os, subprocess, sys, time
try:
    ctypes.CDLL(None, use_errno=True).prctl(36, 1, 0, 0, 0)  # PR_SET_CHILD_SUBREAPER
except Exception:
    pass
start = time.perf_counter()
child = subprocess.Popen(sys.argv[1:], stdout=subprocess.PIPE)
out = child.stdout.read()
_, status, usage = os.wait4(child.pid, 0)
wall = time.perf_counter() - start
cpu = usage.ru_utime + usage.ru_stime
while True:
    try:
        _, _, more = os.wait4(-1, 0)
    except ChildProcessError:
        break
    cpu += more.ru_utime + more.ru_stime
print(json.dumps({"wall": wall, "cpu": cpu, "status": status, "stdout": out.decode()}))
`);
write('aisle.json', JSON.stringify({ kind: 'process', command: ['python3', './aisle_env.py'] }));
write('walker.json', JSON.stringify({ kind: 'process', name: 'walker' }));
write('uniform.json', JSON.stringify({ kind: 'uniform' }));

function timed(command) {
  const result = spawnSync('python3', [path.join(dir, 'cpu_time.py'), ...command], {
    cwd: dir,
    encoding: 'utf8',
    env: { ...process.env, RECKON_NO_PROGRESS: '1', PYTHONPATH: path.join(ROOT, 'python') },
    maxBuffer: 64 * 1024 * 1024,
  });
  const report = JSON.parse(result.stdout);
  if (report.status !== 0) throw new Error(`${command.join(' ')} failed: ${result.stderr}`);
  return { wall: report.wall, cpu: report.cpu, out: JSON.parse(report.stdout) };
}

const reckon = (policy, episodes, workers, cli = CLI) =>
  timed([process.execPath, cli, 'estimate', '--env', 'aisle.json', '--policy', policy, '--episodes', String(episodes), '--seed', String(SEED), '--workers', String(workers), '--no-store', '--json']);

function seedsFile(episodes) {
  const items = [];
  for (let i = 0; i < episodes; i++) items.push(`[${episodeSeed(SEED, 0, i)},${episodeSeed(SEED, 1, i)}]`);
  const file = path.join(dir, `items-${episodes}.json`);
  writeFileSync(file, `[${items.join(',')}]`);
  return file;
}

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

const loadBefore = loadavg();
const started = performance.now();
const BEFORE = process.env.BENCH_BEFORE ? path.join(path.resolve(process.env.BENCH_BEFORE), 'dist/cli/main.js') : null;
const SHORT_SECONDS = 1.5;
// Pilots: episodes that make Python alone take about the target time. A short pilot runs
// slower per episode than a long loop (warm-up), which would size the runs too short.
const pilotEpisodes = 10000;
const episodePilot = timed(['python3', 'alone.py', 'episodes', String(pilotEpisodes), seedsFile(pilotEpisodes)]).out;
const sized = (pilot, seconds) => Math.max(1000, Math.round((pilotEpisodes * seconds) / pilot.seconds / 1000) * 1000);
// The step path through reckon is several times slower than Python alone: sized from a pilot through reckon.
const stepReckonPilot = reckon('uniform.json', pilotEpisodes, 1).out;
const stepEpisodes = Math.max(1000, Math.round((pilotEpisodes * TARGET_SECONDS) / stepReckonPilot.sampling_seconds / 1000) * 1000);
const shortEpisodes = sized(episodePilot, SHORT_SECONDS);
const longEpisodes = sized(episodePilot, TARGET_SECONDS);
const shortItems = seedsFile(shortEpisodes);
const longItems = seedsFile(longEpisodes);

const rounds = [];
for (let r = 0; r < ROUNDS; r++) {
  const round = {};
  round.stepAlone = timed(['python3', 'alone.py', 'steps', String(stepEpisodes)]);
  round.step1 = reckon('uniform.json', stepEpisodes, 1);
  round.step2 = reckon('uniform.json', stepEpisodes, 2);
  round.shortAlone = timed(['python3', 'alone.py', 'episodes', String(shortEpisodes), shortItems]);
  round.short1 = reckon('walker.json', shortEpisodes, 1);
  if (BEFORE) round.shortBefore = reckon('walker.json', shortEpisodes, 1, BEFORE);
  round.longAlone = timed(['python3', 'alone.py', 'episodes', String(longEpisodes), longItems]);
  round.long1 = reckon('walker.json', longEpisodes, 1);
  round.long2 = reckon('walker.json', longEpisodes, 2);
  if (BEFORE) round.longBefore = reckon('walker.json', longEpisodes, 1, BEFORE);
  rounds.push(round);
  process.stderr.write(`round ${r + 1}/${ROUNDS} done\n`);
}
const loadAfter = loadavg();

const m = (pick) => median(rounds.map(pick));
const sameReturns = (alone, viaReckon) => Math.abs(alone.returns_sum / alone.episodes - viaReckon.mean) <= 1e-12 * Math.max(1, Math.abs(viaReckon.mean));
/** One episode-path length: the whole reckon command against the whole Python process. */
const lengthFigures = (alone, one, before) => ({
  alone_loop_seconds: m((r) => r[alone].out.seconds),
  alone_wall: m((r) => r[alone].wall),
  alone_cpu: m((r) => r[alone].cpu),
  reckon_wall: m((r) => r[one].wall),
  reckon_cpu: m((r) => r[one].cpu),
  reckon_sampling_seconds: m((r) => r[one].out.sampling_seconds),
  overhead_wall: m((r) => r[one].wall / r[alone].wall - 1),
  overhead_cpu: m((r) => r[one].cpu / r[alone].cpu - 1),
  overhead_sampling: m((r) => r[one].out.sampling_seconds / r[alone].out.seconds - 1),
  same_returns: sameReturns(rounds[0][alone].out, rounds[0][one].out),
  before: before
    ? {
        wall: m((r) => r[before].wall),
        cpu: m((r) => r[before].cpu),
        overhead_wall: m((r) => r[before].wall / r[alone].wall - 1),
        overhead_cpu: m((r) => r[before].cpu / r[alone].cpu - 1),
        same_mean: rounds[0][before].out.mean === rounds[0][one].out.mean,
      }
    : null,
});
const figures = {
  step: {
    episodes: stepEpisodes,
    steps: rounds[0].step1.out.steps,
    alone_steps_per_second: m((r) => r.stepAlone.out.steps / r.stepAlone.out.seconds),
    reckon_1_steps_per_second: m((r) => r.step1.out.steps / r.step1.out.sampling_seconds),
    reckon_2_steps_per_second: m((r) => r.step2.out.steps / r.step2.out.sampling_seconds),
    ratio_1: m((r) => r.step1.out.steps / r.step1.out.sampling_seconds / (r.stepAlone.out.steps / r.stepAlone.out.seconds)),
    sampling_seconds_1: m((r) => r.step1.out.sampling_seconds),
    speedup_2_workers: m((r) => r.step1.out.sampling_seconds / r.step2.out.sampling_seconds),
    same_mean_1_2: rounds.every((r) => r.step1.out.mean === r.step2.out.mean),
    cpu_1: m((r) => r.step1.cpu),
    cpu_2: m((r) => r.step2.cpu),
    cpu_alone: m((r) => r.stepAlone.cpu),
  },
  episode: {
    short_episodes: shortEpisodes,
    long_episodes: longEpisodes,
    steps: rounds[0].long1.out.steps,
    short: lengthFigures('shortAlone', 'short1', BEFORE ? 'shortBefore' : null),
    long: lengthFigures('longAlone', 'long1', BEFORE ? 'longBefore' : null),
    reckon_2_sampling_seconds: m((r) => r.long2.out.sampling_seconds),
    reckon_2_wall: m((r) => r.long2.wall),
    reckon_2_cpu: m((r) => r.long2.cpu),
    speedup_2_workers: m((r) => r.long1.out.sampling_seconds / r.long2.out.sampling_seconds),
    speedup_2_workers_wall: m((r) => r.long1.wall / r.long2.wall),
    same_mean_1_2: rounds.every((r) => r.long1.out.mean === r.long2.out.mean),
    // CPU per extra episode (µs), from the short and long runs: start-up cancels out.
    alone_cpu_per_episode_us: m((r) => ((r.longAlone.cpu - r.shortAlone.cpu) / (longEpisodes - shortEpisodes)) * 1e6),
    reckon_cpu_per_episode_us: m((r) => ((r.long1.cpu - r.short1.cpu) / (longEpisodes - shortEpisodes)) * 1e6),
    marginal_overhead_cpu: m((r) => (r.long1.cpu - r.short1.cpu) / (r.longAlone.cpu - r.shortAlone.cpu) - 1),
    fixed_cpu_reckon: m((r) => r.short1.cpu - (shortEpisodes * (r.long1.cpu - r.short1.cpu)) / (longEpisodes - shortEpisodes)),
    fixed_cpu_alone: m((r) => r.shortAlone.cpu - (shortEpisodes * (r.longAlone.cpu - r.shortAlone.cpu)) / (longEpisodes - shortEpisodes)),
  },
};

const result = {
  date: new Date().toISOString(),
  machine: `${cpus()[0]?.model ?? 'unknown'}, ${cpus().length} cores; Node ${process.version}`,
  load_before: loadBefore,
  load_after: loadAfter,
  rounds: ROUNDS,
  before: BEFORE,
  seconds: (performance.now() - started) / 1000,
  figures,
  raw: rounds,
};
mkdirSync(path.join(ROOT, 'bench-results'), { recursive: true });
writeFileSync(path.join(ROOT, 'bench-results', 'bench-python.json'), JSON.stringify(result, null, 2));

const f = (x, d = 2) => x.toFixed(d);
const k = (x) => `${Math.round(x / 1000).toLocaleString('en')} k`;
const pct = (x) => `${x >= 0 ? '+' : ''}${f(100 * x, 1)}%`;
const n = (x) => x.toLocaleString('en');
const s = figures.step;
const e = figures.episode;
console.log(`Python process bridge (${result.machine}); ${ROUNDS} rounds in fresh processes, medians; load average ${loadBefore.map((x) => f(x, 1)).join(' ')} before, ${loadAfter.map((x) => f(x, 1)).join(' ')} after; ${f(result.seconds, 0)} s in all.`);
console.log('');
console.log('| path | measure | Python alone | through reckon | ratio |');
console.log('|---|---|---:|---:|---:|');
console.log(`| step (reckon's uniform policy acts) | steps/s, 1 worker (${n(s.episodes)} episodes, ${f(s.steps / 1e6)} M steps) | ${k(s.alone_steps_per_second)} | ${k(s.reckon_1_steps_per_second)} | ${f(s.ratio_1)}× |`);
console.log(`| step | steps/s, 2 workers | | ${k(s.reckon_2_steps_per_second)} | ${f(s.speedup_2_workers)}× 1 worker${s.same_mean_1_2 ? '' : ' (MEANS DIFFER)'} |`);
for (const [name, episodes, x] of [['short run', e.short_episodes, e.short], ['realistic run', e.long_episodes, e.long]]) {
  console.log(`| episode (a policy of the script acts), ${name} | whole command, wall (${n(episodes)} episodes) | ${f(x.alone_wall)} s | ${f(x.reckon_wall)} s | ${pct(x.overhead_wall)} |`);
  console.log(`| episode, ${name} | whole command, CPU | ${f(x.alone_cpu)} s | ${f(x.reckon_cpu)} s | ${pct(x.overhead_cpu)} |`);
  if (x.before) console.log(`| episode, ${name} | the same before (BENCH_BEFORE), wall / CPU | | ${f(x.before.wall)} s / ${f(x.before.cpu)} s | ${pct(x.before.overhead_wall)} / ${pct(x.before.overhead_cpu)}${x.before.same_mean ? '' : ' (MEAN DIFFERS)'} |`);
}
console.log(`| episode | CPU per extra episode | ${f(e.alone_cpu_per_episode_us, 1)} µs | ${f(e.reckon_cpu_per_episode_us, 1)} µs | ${pct(e.marginal_overhead_cpu)} |`);
console.log(`| episode | fixed CPU (start-up) | ${f(e.fixed_cpu_alone)} s | ${f(e.fixed_cpu_reckon)} s | |`);
console.log(`| episode, realistic run | 2 workers ÷ 1 worker, sampling time / whole command (wall) | | ${f(e.long.reckon_sampling_seconds)} s → ${f(e.reckon_2_sampling_seconds)} s | ${f(e.speedup_2_workers)}× / ${f(e.speedup_2_workers_wall)}×${e.same_mean_1_2 ? '' : ' (MEANS DIFFER)'} |`);
console.log(`| episode, realistic run | CPU, 1 worker / 2 workers | | ${f(e.long.reckon_cpu)} s / ${f(e.reckon_2_cpu)} s | |`);
console.log('');
console.log(`Same returns as the loop alone: ${e.short.same_returns && e.long.same_returns ? 'yes' : 'NO'}.`);
