import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { reckon, tempFiles } from './run-cli.js';

/**
 * How many programs a process environment's run starts: one per worker, and none besides to
 * describe the environment (the program that tells reckon the actions, discount, horizon and
 * reward bounds then runs episodes), whether the calling thread drives the first program
 * (reckon's policies, a policy of the program) or worker threads drive them all (a module policy). Each program writes a line to a
 * file when its make_env is first called; the figures must not depend on how many there were.
 */
const COUNTER = `
import os
from reckon_bridge import serve

class Belt:
    actions = ["slow", "fast"]
    discount = 0.95
    reward_bounds = (0, 1)

    def __init__(self, options):
        with open(options["log"], "a") as log:
            log.write("%d\\n" % os.getpid())
        self.t = 0

    def reset(self, seed):
        self.t = seed % 5
        return self.t, {}

    def step(self, action):
        self.t += 1 + action
        return self.t, 0.1 * action, self.t >= 12, False, {}

class Fast:
    def act(self, observation, rng):
        return 1 if rng.random() < 0.7 else 0

serve(Belt, policies={"fast": lambda options, actions: Fast()})
`;

const dir = tempFiles({
  'belt.py': COUNTER,
  'fast.json': { kind: 'process', name: 'fast' },
  'uniform.json': { kind: 'uniform' },
  // A policy of the user's JavaScript: its calls could hold a thread, so everything runs on worker threads.
  'fast-module.js': 'export default function createFast() {\n  return { act: (state, rng) => (rng.uniform() < 0.7 ? 1 : 0) };\n}\n',
  'fast-module.json': { kind: 'module', path: './fast-module.js' },
});
const inDir = (name: string) => path.join(dir, name);

/** Runs an estimate with a fresh log and returns its figures and the pids of the programs that served it. */
function run(tag: string, policy: string, workers: number, episodes: number) {
  const log = inDir(`${tag}.log`);
  const env = inDir(`${tag}.json`);
  writeFileSync(env, JSON.stringify({ kind: 'process', command: ['python3', './belt.py'], options: { log } }));
  const out = reckon(['estimate', '--env', env, '--policy', inDir(policy), '--episodes', String(episodes), '--seed', '4', '--workers', String(workers), '--no-store', '--json']);
  if (out.code !== 0) throw new Error(`exit ${out.code}: ${out.stderr}`);
  const pids = existsSync(log) ? new Set(readFileSync(log, 'utf8').trim().split('\n')) : new Set<string>();
  return { figures: JSON.parse(out.stdout), programs: pids.size };
}

describe('a process environment starts one program per worker, and no other', () => {
  for (const [name, policy] of [
    ['episode path (the program acts)', 'fast.json'],
    ['step path (reckon acts)', 'uniform.json'],
    ['step path with a module policy (worker threads only)', 'fast-module.json'],
  ] as const) {
    it(name, () => {
      const tag = policy.replace('.json', '');
      const one = run(`${tag}-1`, policy, 1, 300);
      expect(one.programs).toBe(1);
      // Two workers: at most two programs (a second that is not ready before the first has run
      // every episode is ended unused, so fewer can be seen).
      const two = run(`${tag}-2`, policy, 2, 300);
      expect(two.programs).toBeGreaterThanOrEqual(1);
      expect(two.programs).toBeLessThanOrEqual(2);
      // A run too short to share (one thread per 64 episodes) starts one program, whatever --workers says.
      const short = run(`${tag}-short`, policy, 2, 40);
      expect(short.programs).toBe(1);
      for (const key of ['mean', 'std', 'ci', 'mean_length']) expect(two.figures[key]).toStrictEqual(one.figures[key]);
      expect(one.figures.horizon).toBe(two.figures.horizon);
    });
  }
});
