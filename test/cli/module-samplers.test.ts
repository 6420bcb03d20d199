import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import path from 'node:path';
import Database from 'better-sqlite3';
import { CLI, reckon, tempFiles } from './run-cli.js';

/**
 * A code environment that uses every named distribution of its rng, through the command
 * line: the same seed gives bit-identical figures whatever the workers, shards or resumes;
 * two policies on it share the environment's noise; a bad parameter fails the run naming
 * the episode, the step and the value. Equality here is the engine's own contract (same
 * seed, same episodes), so the reference is always an uninterrupted run of the same spec.
 */
const ENV = `
// A repair stand at a bike-share depot, hour by hour: bikes come in, mechanics fix some.
export default (options) => {
  const shares = new Float64Array(3);
  const spin = options.spin ?? 0;
  return {
    actions: ['one-mechanic', 'two-mechanics'],
    discount: 0.95,
    horizon: 30,
    reset: (rng) => rng.poisson(3),
    step(queue, action, rng, out) {
      let busy = 0; for (let i = 0; i < spin; i++) busy += Math.sqrt(i);
      const arrivals = rng.poisson(2.5);
      const waiting = queue + arrivals;
      const fixed = rng.binomial(waiting, action === 1 ? 0.6 : 0.35);
      const partsDelay = rng.exponential(2) + rng.gamma(2, 0.5) + rng.geometric(0.5);
      const rating = rng.beta(2, 3);
      const tipped = rng.bernoulli(rating);
      const kind = rng.categorical([1, 2, 1]);
      rng.dirichlet([1, 2, 0.5], shares);
      out.state = Math.min(waiting - fixed, 40);
      out.reward = fixed - 0.3 * out.state - 0.8 * action + rng.normal(0, 0.2)
        + (tipped ? shares[kind] : 0) - 0.05 * partsDelay + (busy < 0 ? 1 : 0);
      out.done = false;
      return out;
    },
  };
};`;

const POLICY = `
// Call in the second mechanic once the queue reaches a threshold; now and then on a hunch.
export default (options) => ({
  act(queue, rng) {
    if (rng.bernoulli(0.05)) return rng.categorical([1, 1]);
    return queue >= options.threshold ? 'two-mechanics' : 'one-mechanic';
  },
});`;

const dir = tempFiles({
  'depot.js': ENV,
  'depot.json': { kind: 'module', path: './depot.js', options: {} },
  'depot-slow.json': { kind: 'module', path: './depot.js', options: { spin: 6000 } },
  'threshold.js': POLICY,
  'threshold-4.json': { kind: 'module', path: './threshold.js', options: { threshold: 4 } },
  'threshold-5.json': { kind: 'module', path: './threshold.js', options: { threshold: 5 } },
});
const inDir = (name: string) => path.join(dir, name);
const pair = ['--env', inDir('depot.json'), '--policy', inDir('threshold-4.json')];

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

function expectSameFigures(a: Record<string, unknown>, b: Record<string, unknown>): void {
  for (const key of ['episodes', 'mean', 'std', 'ci', 'mean_length', 'min', 'max']) expect(a[key]).toStrictEqual(b[key]);
}

describe('every sampler, reproducible', () => {
  it('bit-identical across --workers 1 and 2, and shards merged', () => {
    const base = ['estimate', ...pair, '--episodes', '2001', '--seed', '8', '--json'];
    const one = json(reckon([...base, '--workers', '1', '--no-store']));
    const two = json(reckon([...base, '--workers', '2', '--no-store']));
    expectSameFigures(one, two);
    for (const k of [1, 2]) json(reckon([...base, '--shard', `${k}/2`, '--store', inDir(`shard-${k}.sqlite`)]));
    const merged = json(reckon(['runs', 'merge', inDir('shard-1.sqlite'), inDir('shard-2.sqlite'), '--into', inDir('merged.sqlite'), '--json']));
    expectSameFigures(merged, one);
    const otherSeed = json(reckon(['estimate', ...pair, '--episodes', '2001', '--seed', '9', '--json', '--no-store']));
    expect(otherSeed.mean).not.toBe(one.mean);
  });

  it('a run stopped part-way and resumed ends with the uninterrupted figures', async () => {
    const store = inDir('resume.sqlite');
    const slow = ['--env', inDir('depot-slow.json'), '--policy', inDir('threshold-4.json'), '--episodes', '2000', '--seed', '5'];
    const child = spawn(process.execPath, [CLI, 'estimate', ...slow, '--workers', '2', '--store', store], {
      env: { ...process.env, RECKON_NO_PROGRESS: '1' },
      stdio: 'ignore',
    });
    await waitForEpisodes(store, 200, 60_000);
    child.kill('SIGTERM');
    expect(await new Promise((r) => child.on('exit', r))).toBe(143);
    const id = json(reckon(['runs', 'list', '--store', store, '--json']))[0].id;
    const resumed = json(reckon(['runs', 'resume', id, '--store', store, '--json']));
    const whole = json(reckon(['estimate', ...slow, '--no-store', '--json']));
    expectSameFigures(resumed, whole);
  });

  it('two policies on it face the same environment noise: pairing reduces the variance', () => {
    const out = json(reckon(['compare', '--env', inDir('depot.json'), '--policy', inDir('threshold-4.json'), '--policy', inDir('threshold-5.json'),
      '--episodes', '4000', '--seed', '3', '--no-store', '--json']));
    expect(out.differences[0].correlation).toBeGreaterThan(0.5);
    expect(out.differences[0].variance_reduction).toBeGreaterThan(1);
  });
});

describe('a bad parameter', () => {
  it('in the environment fails the run naming the episode, the step and the value (exit 1)', () => {
    const bad = tempFiles({
      'bad.js': `export default () => ({
        actions: ['a'], discount: 0.9, horizon: 10,
        reset: () => 0,
        step(t, action, rng, out) {
          out.reward = rng.poisson(t === 3 ? t - 4 : 2); out.state = t + 1; out.done = false; return out;
        },
      });`,
      'bad.json': { kind: 'module', path: './bad.js' },
      'uniform.json': { kind: 'uniform' },
    });
    const out = reckon(['estimate', '--env', 'bad.json', '--policy', 'uniform.json', '--episodes', '5', '--seed', '1', '--no-store'], { cwd: bad });
    expect(out.code).toBe(1);
    expect(out.stderr).toContain('the environment (step) threw at episode 0, step 3: rng.poisson: lambda must be a finite number > 0 (got -1)');
  });

  it('in a policy names the policy', () => {
    const bad = tempFiles({
      'p.js': `export default () => ({ act: (state, rng) => (rng.bernoulli(1.5) ? 0 : 1) });`,
      'p.json': { kind: 'module', path: './p.js' },
    });
    const out = reckon(['estimate', '--env', inDir('depot.json'), '--policy', path.join(bad, 'p.json'), '--episodes', '5', '--seed', '1', '--no-store']);
    expect(out.code).toBe(1);
    expect(out.stderr).toContain('the policy threw at episode 0, step 0: rng.bernoulli: p must be a probability in [0, 1] (got 1.5)');
  });
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
