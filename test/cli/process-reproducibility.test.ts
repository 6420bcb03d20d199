import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import path from 'node:path';
import Database from 'better-sqlite3';
import { CLI, ENVS, reckon, tempFiles } from './run-cli.js';

/**
 * A process environment through the command line: the Python warehouse of envs/python/ gives
 * the same figures, bit for bit, with any --workers, shards and resumes, on both ways to act
 * (reckon's policy stepping the program, and a policy of the program running whole episodes).
 * Equality here is the engine's own contract (same seed, same episodes), so the reference is
 * always an uninterrupted run of the same spec.
 */
const PYTHON_ENVS = path.join(ENVS, 'python');

const SLOW = `
import sys, time
sys.path.insert(0, ${JSON.stringify(PYTHON_ENVS)})
from reckon_bridge import serve
from warehouse_env import Warehouse, make_direct

class SlowWarehouse(Warehouse):
    def step(self, action):
        time.sleep(0.0003)
        return super().step(action)

serve(SlowWarehouse, policies={"direct": make_direct})
`;

const dir = tempFiles({
  'slow_env.py': SLOW,
  'slow.json': { kind: 'process', command: ['python3', './slow_env.py'] },
  'careful-eps.json': { kind: 'epsilon', epsilon: 0.1, base: { path: path.join(ENVS, 'picker-careful.json') } },
});
const inDir = (name: string) => path.join(dir, name);

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

function expectSameFigures(a: Record<string, unknown>, b: Record<string, unknown>): void {
  for (const key of ['episodes', 'mean', 'std', 'ci', 'mean_length', 'min', 'max']) expect(a[key]).toStrictEqual(b[key]);
}

const warehouse = path.join(PYTHON_ENVS, 'warehouse.json');
const paths = [
  { name: 'step path (reckon acts)', policy: inDir('careful-eps.json') },
  { name: 'episode path (the program acts)', policy: path.join(PYTHON_ENVS, 'direct-eps.json') },
];

describe('a process environment is reproducible', () => {
  for (const { name, policy } of paths) {
    it(`${name}: bit-identical across --workers 1 and 2, and shards merged`, () => {
      const base = ['estimate', '--env', warehouse, '--policy', policy, '--episodes', '800', '--seed', '8', '--json'];
      const one = json(reckon([...base, '--workers', '1', '--no-store']));
      const two = json(reckon([...base, '--workers', '2', '--no-store']));
      expectSameFigures(one, two);
      const tag = name.split(' ')[0];
      for (const k of [1, 2]) json(reckon([...base, '--shard', `${k}/2`, '--store', inDir(`${tag}-shard-${k}.sqlite`)]));
      const merged = json(reckon(['runs', 'merge', inDir(`${tag}-shard-1.sqlite`), inDir(`${tag}-shard-2.sqlite`), '--into', inDir(`${tag}-merged.sqlite`), '--json']));
      expectSameFigures(merged, one);
    }, 60_000);
  }

  for (const { name, policy } of paths) {
    it(`${name}: a run stopped part-way and resumed ends with the uninterrupted figures`, async () => {
      const store = inDir(`resume-${name.split(' ')[0]}.sqlite`);
      const args = ['--env', inDir('slow.json'), '--policy', policy, '--episodes', '400', '--seed', '5'];
      const child = spawn(process.execPath, [CLI, 'estimate', ...args, '--workers', '2', '--store', store], {
        env: { ...process.env, RECKON_NO_PROGRESS: '1' },
        stdio: 'ignore',
      });
      await waitForEpisodes(store, 32, 60_000);
      child.kill('SIGTERM');
      expect(await new Promise((r) => child.on('exit', r))).toBe(143);
      const id = json(reckon(['runs', 'list', '--store', store, '--json']))[0].id;
      const resumed = json(reckon(['runs', 'resume', id, '--store', store, '--json']));
      const whole = json(reckon(['estimate', ...args, '--no-store', '--json']));
      expectSameFigures(resumed, whole);
    }, 90_000);
  }

  it('compare of two policies of the program shares the environment seeds: pairing reduces the variance', () => {
    const out = json(reckon(['compare', '--env', warehouse, '--policy', path.join(PYTHON_ENVS, 'direct.json'), '--policy', path.join(PYTHON_ENVS, 'direct-eps.json'),
      '--episodes', '3000', '--seed', '3', '--no-store', '--json']));
    // On the gridworld file the same pair correlates at about 0.69 (README, "Comparing policies").
    expect(out.differences[0].correlation).toBeGreaterThan(0.5);
    expect(out.differences[0].variance_reduction).toBeGreaterThan(1.5);
  }, 60_000);
});

function waitForEpisodes(store: string, atLeast: number, timeoutMs: number): Promise<void> {
  const started = Date.now();
  return new Promise((resolve, reject) => {
    const poll = () => {
      try {
        const db = new Database(store, { readonly: true, fileMustExist: true });
        const row = db.prepare('SELECT episodes_done FROM runs').get() as { episodes_done: number } | undefined;
        db.close();
        if (row && row.episodes_done >= atLeast) return resolve();
      } catch {
        // not created yet
      }
      if (Date.now() - started > timeoutMs) return reject(new Error('the run never committed episodes'));
      setTimeout(poll, 50);
    };
    poll();
  });
}
