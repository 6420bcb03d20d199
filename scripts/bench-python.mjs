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
 * Run sizes are set from a pilot so each reckon run on one worker samples for about 6 s. Wall
 * time and CPU time (user + system of the whole process tree, from wait4) are both recorded,
 * because the machines this runs on are shared: a wall-clock ratio says what a user waits, a
 * CPU-time ratio what the bridge costs whatever else is running. Medians of the rounds.
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

const reckon = (policy, episodes, workers) =>
  timed([process.execPath, CLI, 'estimate', '--env', 'aisle.json', '--policy', policy, '--episodes', String(episodes), '--seed', String(SEED), '--workers', String(workers), '--no-store', '--json']);

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
// Pilots: episodes that make one reckon worker sample for about TARGET_SECONDS.
const pilotEpisodes = 2000;
const stepPilot = reckon('uniform.json', pilotEpisodes, 1).out;
const episodePilot = reckon('walker.json', pilotEpisodes, 1).out;
const stepEpisodes = Math.max(pilotEpisodes, Math.round((pilotEpisodes * TARGET_SECONDS) / stepPilot.sampling_seconds / 1000) * 1000);
const episodeEpisodes = Math.max(pilotEpisodes, Math.round((pilotEpisodes * TARGET_SECONDS) / episodePilot.sampling_seconds / 1000) * 1000);
const items = seedsFile(episodeEpisodes);
// Three times the episodes, for the per-episode (marginal) CPU cost apart from start-up.
const longEpisodes = 3 * episodeEpisodes;
const longItems = seedsFile(longEpisodes);

const rounds = [];
for (let r = 0; r < ROUNDS; r++) {
  const round = {};
  round.stepAlone = timed(['python3', 'alone.py', 'steps', String(stepEpisodes)]);
  round.step1 = reckon('uniform.json', stepEpisodes, 1);
  round.step2 = reckon('uniform.json', stepEpisodes, 2);
  round.episodeAlone = timed(['python3', 'alone.py', 'episodes', String(episodeEpisodes), items]);
  round.episode1 = reckon('walker.json', episodeEpisodes, 1);
  round.episode2 = reckon('walker.json', episodeEpisodes, 2);
  round.longAlone = timed(['python3', 'alone.py', 'episodes', String(longEpisodes), longItems]);
  round.long1 = reckon('walker.json', longEpisodes, 1);
  rounds.push(round);
  process.stderr.write(`round ${r + 1}/${ROUNDS} done\n`);
}
const loadAfter = loadavg();

const m = (pick) => median(rounds.map(pick));
const alone = rounds[0].episodeAlone.out;
const viaReckon = rounds[0].episode1.out;
const sameReturns = Math.abs(alone.returns_sum / alone.episodes - viaReckon.mean) <= 1e-12 * Math.max(1, Math.abs(viaReckon.mean));
const figures = {
  step: {
    episodes: stepEpisodes,
    steps: rounds[0].step1.out.steps,
    alone_steps_per_second: m((r) => r.stepAlone.out.steps / r.stepAlone.out.seconds),
    reckon_1_steps_per_second: m((r) => r.step1.out.steps / r.step1.out.sampling_seconds),
    reckon_2_steps_per_second: m((r) => r.step2.out.steps / r.step2.out.sampling_seconds),
    sampling_seconds_1: m((r) => r.step1.out.sampling_seconds),
    speedup_2_workers: m((r) => r.step1.out.sampling_seconds / r.step2.out.sampling_seconds),
    cpu_1: m((r) => r.step1.cpu),
    cpu_2: m((r) => r.step2.cpu),
    cpu_alone: m((r) => r.stepAlone.cpu),
  },
  episode: {
    episodes: episodeEpisodes,
    steps: viaReckon.steps,
    alone_loop_seconds: m((r) => r.episodeAlone.out.seconds),
    alone_wall: m((r) => r.episodeAlone.wall),
    alone_cpu: m((r) => r.episodeAlone.cpu),
    reckon_1_sampling_seconds: m((r) => r.episode1.out.sampling_seconds),
    reckon_1_wall: m((r) => r.episode1.wall),
    reckon_1_cpu: m((r) => r.episode1.cpu),
    reckon_2_sampling_seconds: m((r) => r.episode2.out.sampling_seconds),
    reckon_2_cpu: m((r) => r.episode2.cpu),
    overhead_sampling: m((r) => r.episode1.out.sampling_seconds / r.episodeAlone.out.seconds - 1),
    overhead_wall: m((r) => r.episode1.wall / r.episodeAlone.wall - 1),
    overhead_cpu: m((r) => r.episode1.cpu / r.episodeAlone.cpu - 1),
    speedup_2_workers: m((r) => r.episode1.out.sampling_seconds / r.episode2.out.sampling_seconds),
    same_returns: sameReturns,
    // CPU per extra episode (µs), from the runs of N and 3N episodes: start-up cancels out.
    long_episodes: longEpisodes,
    alone_cpu_per_episode_us: m((r) => ((r.longAlone.cpu - r.episodeAlone.cpu) / (longEpisodes - episodeEpisodes)) * 1e6),
    reckon_cpu_per_episode_us: m((r) => ((r.long1.cpu - r.episode1.cpu) / (longEpisodes - episodeEpisodes)) * 1e6),
    marginal_overhead_cpu: m((r) => (r.long1.cpu - r.episode1.cpu) / (r.longAlone.cpu - r.episodeAlone.cpu) - 1),
    fixed_cpu_reckon: m((r) => r.episode1.cpu - (episodeEpisodes * (r.long1.cpu - r.episode1.cpu)) / (longEpisodes - episodeEpisodes)),
    fixed_cpu_alone: m((r) => r.episodeAlone.cpu - (episodeEpisodes * (r.longAlone.cpu - r.episodeAlone.cpu)) / (longEpisodes - episodeEpisodes)),
    long_overhead_cpu: m((r) => r.long1.cpu / r.longAlone.cpu - 1),
  },
};

const result = {
  date: new Date().toISOString(),
  machine: `${cpus()[0]?.model ?? 'unknown'}, ${cpus().length} cores; Node ${process.version}`,
  load_before: loadBefore,
  load_after: loadAfter,
  rounds: ROUNDS,
  seconds: (performance.now() - started) / 1000,
  figures,
  raw: rounds,
};
mkdirSync(path.join(ROOT, 'bench-results'), { recursive: true });
writeFileSync(path.join(ROOT, 'bench-results', 'bench-python.json'), JSON.stringify(result, null, 2));

const f = (x, d = 2) => x.toFixed(d);
const k = (x) => `${f(x / 1000, 1)} k`;
const pct = (x) => `${x >= 0 ? '+' : ''}${f(100 * x, 1)}%`;
const s = figures.step;
const e = figures.episode;
console.log(`Python process bridge (${result.machine}); ${ROUNDS} rounds in fresh processes, medians; load average ${loadBefore.map((x) => f(x, 1)).join(' ')} before, ${loadAfter.map((x) => f(x, 1)).join(' ')} after; ${f(result.seconds, 0)} s in all.`);
console.log('');
console.log('| path | run | Python alone | reckon, 1 worker | reckon, 2 workers | 2 workers ÷ 1 (wall) | CPU s, 1 worker / 2 workers |');
console.log('|---|---|---:|---:|---:|---:|---:|');
console.log(`| step (reckon's uniform policy) | ${s.episodes.toLocaleString('en')} episodes, ${(s.steps / 1e6).toFixed(2)} M steps | ${k(s.alone_steps_per_second)} steps/s | ${k(s.reckon_1_steps_per_second)} steps/s (${f(s.reckon_1_steps_per_second / s.alone_steps_per_second)}× alone) | ${k(s.reckon_2_steps_per_second)} steps/s | ${f(s.speedup_2_workers)}× | ${f(s.cpu_1, 1)} / ${f(s.cpu_2, 1)} |`);
console.log(`| episode (a policy of the script) | ${e.episodes.toLocaleString('en')} episodes, ${(e.steps / 1e6).toFixed(2)} M steps | ${f(e.alone_loop_seconds)} s loop (${f(e.alone_wall)} s, ${f(e.alone_cpu)} s CPU for the process) | ${f(e.reckon_1_sampling_seconds)} s sampling (${f(e.reckon_1_wall)} s, ${f(e.reckon_1_cpu)} s CPU for the command) | ${f(e.reckon_2_sampling_seconds)} s sampling | ${f(e.speedup_2_workers)}× | ${f(e.reckon_1_cpu, 1)} / ${f(e.reckon_2_cpu, 1)} |`);
console.log('');
console.log(`Episode path, reckon's time over the same loop alone: sampling ${pct(e.overhead_sampling)}, whole command against whole Python process ${pct(e.overhead_wall)} (wall), ${pct(e.overhead_cpu)} (CPU); same returns: ${e.same_returns ? 'yes' : 'NO'}.`);
console.log(`Episode path, CPU per extra episode (runs of ${e.episodes.toLocaleString('en')} and ${e.long_episodes.toLocaleString('en')}): ${f(e.alone_cpu_per_episode_us, 1)} µs alone, ${f(e.reckon_cpu_per_episode_us, 1)} µs through reckon (${pct(e.marginal_overhead_cpu)}); fixed CPU ${f(e.fixed_cpu_alone)} s alone, ${f(e.fixed_cpu_reckon)} s through reckon; at ${e.long_episodes.toLocaleString('en')} episodes the whole command's CPU is ${pct(e.long_overhead_cpu)} over the Python process's.`);
