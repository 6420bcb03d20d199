import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import path from 'node:path';
import { existsSync } from 'node:fs';
import Database from 'better-sqlite3';
import { CLI, reckon, tempFiles } from './run-cli.js';
import { STREAM, seedStream } from '../../src/engine/streams.js';
import { Xoshiro128 } from '../../src/engine/xoshiro128.js';

/**
 * A plug-in whose step never returns. The environment jams (throws, or spins for ever) at
 * step 3 of the first episodes whose start draw falls below 0.05, so the throwing variant
 * names the episode at which the spinning one must be caught.
 */
const dir = tempFiles({
  'throws.json': { kind: 'module', path: './jam.js', options: { spin: false } },
  'spins.json': { kind: 'module', path: './jam.js', options: { spin: true } },
  'uniform.json': { kind: 'uniform' },
  'jam.js': `export default ({ spin }) => ({
    actions: ['a', 'b'], discount: 0.9, horizon: 10, rewardBounds: [0, 1],
    reset: (rng) => ({ t: 0, jams: rng.uniform() < 0.05 }),
    step(state, action, rng, out) {
      if (state.jams && state.t === 3) {
        if (!spin) throw new Error('the conveyor jammed');
        for (;;) {}
      }
      out.state = { t: state.t + 1, jams: state.jams }; out.reward = rng.uniform(); out.done = false; return out;
    },
  });`,
});
const policy = ['--policy', path.join(dir, 'uniform.json')];

function runStored(store: string): boolean {
  try {
    const db = new Database(store, { readonly: true, fileMustExist: true });
    try {
      return db.prepare('SELECT COUNT(*) AS n FROM runs').get() !== undefined && (db.prepare('SELECT COUNT(*) AS n FROM runs').get() as { n: number }).n > 0;
    } finally {
      db.close();
    }
  } catch {
    return false;
  }
}

/** The episodes that jam with seed 5: those whose first environment draw is below 0.05. */
function jammingEpisodes(seed: number, episodes: number): number[] {
  const rng = new Xoshiro128();
  const found: number[] = [];
  for (let e = 0; e < episodes; e++) {
    seedStream(rng, seed, STREAM.ENV, e);
    if (rng.uniform() < 0.05) found.push(e);
  }
  return found;
}

describe('a plug-in that hangs', () => {
  it('fails the run after --step-timeout with a PluginError naming the episode and step; finished episodes are kept and the reason is stored', () => {
    const jams = jammingEpisodes(5, 400);
    // One worker meets the jams in episode order: the throwing variant names the first.
    const thrown = reckon(['estimate', '--env', path.join(dir, 'throws.json'), ...policy, '--episodes', '400', '--seed', '5', '--workers', '1', '--no-store']);
    expect(thrown.code).toBe(1);
    expect(thrown.stderr).toContain(`threw at episode ${jams[0]}, step 3: the conveyor jammed`);

    const store = path.join(tempFiles({}), 'runs.sqlite');
    const reported = new Map<string, number>();
    for (const workers of ['1', '2']) {
      const hung = reckon(['estimate', '--env', path.join(dir, 'spins.json'), ...policy, '--episodes', '400', '--seed', '5', '--workers', workers, '--step-timeout', '2', '--store', store, '--json']);
      expect(hung.code).toBe(1);
      // With two threads, each may be stuck in a jam of its own: either is a right answer.
      const where = /the environment \(step\) hung at episode (\d+), step 3/.exec(hung.stderr);
      expect(where).not.toBeNull();
      const episode = Number(where![1]);
      expect(workers === '1' ? [jams[0]] : jams).toContain(episode);
      expect(hung.stderr).toContain('--step-timeout');
      reported.set(workers, episode);
    }
    const runs = JSON.parse(reckon(['runs', 'list', '--store', store, '--json']).stdout);
    expect(runs).toHaveLength(2);
    for (const run of runs) {
      const episode = reported.get(String(run.id === runs[0].id ? 2 : 1))!;
      expect(run.status).toBe('failed');
      // Committed episodes stop before the block the stuck call is in.
      expect(run.episodes).toBeLessThanOrEqual(episode);
      const shown = reckon(['runs', 'show', run.id, '--store', store]);
      expect(shown.code).toBe(0);
      expect(shown.stdout).toContain(`Failed: the environment (step) hung at episode ${episode}, step 3`);
      const json = JSON.parse(reckon(['runs', 'show', run.id, '--store', store, '--json']).stdout);
      expect(json.status).toBe('failed');
      expect(json.error).toContain(`hung at episode ${episode}, step 3`);
    }
  }, 120_000);

  it('Ctrl-C stops a run whose plug-in is stuck, long before the step timeout', async () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const child = spawn(process.execPath, [CLI, 'estimate', '--env', path.join(dir, 'spins.json'), ...policy, '--episodes', '400', '--seed', '5', '--step-timeout', '600', '--store', store], {
      env: { ...process.env, RECKON_NO_PROGRESS: '1' },
    });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
    // Once the run is stored its signal handlers are in place; the jam comes within the first
    // hundred episodes, so a moment later the worker is stuck in it.
    for (let waited = 0; !runStored(store); waited += 100) {
      if (waited > 60_000) throw new Error('the run never started');
      await new Promise((r) => setTimeout(r, 100));
    }
    await new Promise((r) => setTimeout(r, 1500));
    const sent = Date.now();
    child.kill('SIGINT');
    const code = await Promise.race([exited, new Promise<string>((r) => setTimeout(() => r('still running'), 8000))]);
    if (code === 'still running') child.kill('SIGKILL');
    expect(code).toBe(130);
    expect(Date.now() - sent).toBeLessThan(8000);
    expect(stderr).toMatch(/reckon runs resume [a-z2-9]{8}/);
    const db = new Database(store, { readonly: true });
    expect((db.prepare('SELECT status FROM runs').get() as { status: string }).status).toBe('interrupted');
    db.close();
  }, 120_000);
});

/**
 * Plug-ins that are slow before the first episode ends: a factory that never returns (the
 * thread sleeps on a lock nobody releases, so the test costs no CPU), and a step that takes a
 * second, so that the first episode needs four.
 */
const slowDir = tempFiles({
  'stalls.json': { kind: 'module', path: './stalls.js' },
  'crawls.json': { kind: 'module', path: './crawls.js' },
  'uniform.json': { kind: 'uniform' },
  'stalls.js': `export default () => { Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0); };`,
  'crawls.js': `const lock = new Int32Array(new SharedArrayBuffer(4));
  export default () => ({
    actions: ['a'], discount: 0.9, horizon: 4, rewardBounds: [0, 1],
    reset: () => 0,
    step(state, action, rng, out) { Atomics.wait(lock, 0, 0, 1000); out.state = state + 1; out.reward = rng.uniform(); out.done = false; return out; },
  });`,
});

/**
 * Starts an estimate, waits until `ready` (its store exists: its signal handlers are in place;
 * or its run is stored: its module was created), and a second more, then sends `signal`.
 */
async function signalled(
  env: string,
  signal: NodeJS.Signals,
  store: string,
  ready: () => boolean,
  command: string[] = ['estimate', '--policy', path.join(slowDir, 'uniform.json')],
): Promise<{ code: number | null | string; stderr: string; ms: number }> {
  const child = spawn(process.execPath, [CLI, ...command, '--env', path.join(slowDir, env), '--episodes', '50', '--seed', '3', '--workers', '1', '--step-timeout', '600', '--store', store], {
    env: { ...process.env, RECKON_NO_PROGRESS: '1' },
  });
  let stderr = '';
  child.stderr.on('data', (d) => (stderr += d));
  const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
  for (let waited = 0; !ready(); waited += 100) {
    if (waited > 60_000) throw new Error(`the run was never ready: ${stderr}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  await new Promise((r) => setTimeout(r, 1000));
  const sent = Date.now();
  child.kill(signal);
  const code = await Promise.race([exited, new Promise<string>((r) => setTimeout(() => r('still running'), 8000))]);
  if (code === 'still running') child.kill('SIGKILL');
  return { code, stderr, ms: Date.now() - sent };
}

describe('a run stopped before its first episode ends', () => {
  it('Ctrl-C while a module factory never returns exits 130 at once and stores nothing', async () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const { code, stderr, ms } = await signalled('stalls.json', 'SIGINT', store, () => existsSync(store));
    expect(code).toBe(130);
    expect(ms).toBeLessThan(8000);
    expect(stderr).toContain('interrupted (SIGINT) while the environment and policy were being created');
    expect(runStored(store)).toBe(false);
  }, 90_000);

  it('SIGTERM during the first episode marks the run interrupted, exits 143 and says how to resume', async () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    // Signalled once the run is stored, while its first episode (four seconds) runs.
    const { code, stderr } = await signalled('crawls.json', 'SIGTERM', store, () => runStored(store));
    expect(code).toBe(143);
    expect(stderr).not.toContain('no episodes to summarise');
    const resume = /reckon runs resume ([a-z2-9]{8})/.exec(stderr);
    expect(resume).not.toBeNull();
    const runs = JSON.parse(reckon(['runs', 'list', '--store', store, '--json']).stdout);
    expect(runs).toHaveLength(1);
    expect(runs[0].id).toBe(resume![1]);
    expect(runs[0].status).toBe('interrupted');
    expect(runs[0].episodes).toBe(0);
  }, 90_000);

  it('Ctrl-C during a comparison\'s first episode keeps it interrupted, exits 130 and names the resume command', async () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const uniform = path.join(slowDir, 'uniform.json');
    const { code, stderr } = await signalled('crawls.json', 'SIGINT', store, () => runStored(store), ['compare', '--policy', uniform, '--policy', uniform]);
    expect(code).toBe(130);
    const resume = /reckon runs resume ([a-z2-9]{8})/.exec(stderr);
    expect(resume).not.toBeNull();
    const runs = JSON.parse(reckon(['runs', 'list', '--store', store, '--all', '--json']).stdout);
    expect(runs).toHaveLength(3);
    expect(runs.map((r: { status: string }) => r.status)).toEqual(['interrupted', 'interrupted', 'interrupted']);
    expect(runs.find((r: { id: string }) => r.id === resume![1]).kind).toBe('comparison');
  }, 90_000);
});
