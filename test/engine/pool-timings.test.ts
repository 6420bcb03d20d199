import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readDefinitionFile } from '../../src/definitions/read-file.js';
import { keepCodeWorkers, runEpisodes, type RunOutcome } from '../../src/engine/pool.js';
import { runComparison, type CompareRequest } from '../../src/evaluate/compare.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { inlineSource as source, smallGrid, towardsGoal } from '../statistical/small-grid.js';

/**
 * The pool's per-thread timings account for every episode and every thread, threads kept
 * between runs are reused, and the returns stay a pure function of the spec whatever the
 * worker count or reuse (DEVELOPERS.md, "Seeding scheme"). Timings are only checked for
 * consistency (no figure is timed: common practice for tests on shared machines).
 */
const envs = path.resolve(import.meta.dirname, '../../envs');
const restock: RolloutSpec = {
  env: readDefinitionFile(path.join(envs, 'restock-env.json')),
  policy: readDefinitionFile(path.join(envs, 'restock-base-stock.json')),
  seed: 11,
  start: null,
};
const grid: RolloutSpec = { env: { json: smallGrid, source }, policy: { json: towardsGoal, source }, seed: 11, start: null };

async function run(spec: RolloutSpec, count: number, workers: number): Promise<{ outcome: RunOutcome; returns: Float64Array }> {
  const returns = new Float64Array(count);
  const outcome = await runEpisodes(spec, { first: 0, count, workers, onBlock: (b) => returns.set(b.returns, b.first) });
  return { outcome, returns };
}

const same = (a: Float64Array, b: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

function checkAccounts(outcome: RunOutcome, count: number): void {
  expect(outcome.threads.reduce((n, t) => n + t.episodes, 0)).toBe(count);
  expect(outcome.threads.reduce((n, t) => n + t.steps, 0)).toBe(outcome.steps);
  for (const t of outcome.threads) {
    expect(t.busySeconds).toBeGreaterThanOrEqual(0);
    expect(t.idleSeconds).toBeGreaterThanOrEqual(0);
    expect(t.startupSeconds).toBeGreaterThanOrEqual(0);
    expect(t.doneAt).toBeGreaterThanOrEqual(t.readyAt);
    if (t.cpuSeconds !== null && t.startupCpuSeconds !== null) expect(t.cpuSeconds).toBeGreaterThanOrEqual(t.startupCpuSeconds);
  }
}

describe('worker pool: threads, timings and reuse', () => {
  it('a code environment runs on worker threads only, one per worker, with the same returns on 1, 2 and 3', async () => {
    const count = 3000;
    const one = await run(restock, count, 1);
    const two = await run(restock, count, 2);
    const three = await run(restock, count, 3);
    for (const [r, workers] of [[one, 1], [two, 2], [three, 3]] as const) {
      checkAccounts(r.outcome, count);
      expect(r.outcome.threads.map((t) => t.thread)).toEqual(Array(workers).fill('worker'));
    }
    expect(Buffer.from(two.returns.buffer).equals(Buffer.from(one.returns.buffer))).toBe(true);
    expect(Buffer.from(three.returns.buffer).equals(Buffer.from(one.returns.buffer))).toBe(true);
  });

  it('a finite environment on 2 workers runs on this thread and one worker thread', async () => {
    const count = 20000;
    const one = await run(grid, count, 1);
    const two = await run(grid, count, 2);
    checkAccounts(one.outcome, count);
    checkAccounts(two.outcome, count);
    expect(one.outcome.threads.map((t) => t.thread)).toEqual(['caller']);
    expect(two.outcome.threads.map((t) => t.thread).sort()).toEqual(['caller', 'worker']);
    expect(Buffer.from(two.returns.buffer).equals(Buffer.from(one.returns.buffer))).toBe(true);
  });

  it('threads kept from one run serve the next run of the spec without starting again, with the same returns', async () => {
    // The first run is long enough for both threads to finish starting during it (a thread
    // still starting when a short run ends is given back before it was ever ready).
    const whole = await run(restock, 22_000, 1);
    const keep = keepCodeWorkers(restock);
    expect(keep).not.toBeNull();
    const returns = new Float64Array(22_000);
    try {
      const runs: RunOutcome[] = [];
      for (const [first, count] of [[0, 20_000], [20_000, 1200], [21_200, 800]]) {
        runs.push(await runEpisodes(restock, { first, count, workers: 2, keep, onBlock: (b) => returns.set(b.returns, b.first) }));
      }
      for (const r of runs) expect(r.threads).toHaveLength(2);
      // After the first run no thread starts up again: each is ready before its run begins.
      for (const r of runs.slice(1)) for (const t of r.threads) expect([t.startupSeconds, t.readyAt <= 0]).toEqual([0, true]);
    } finally {
      keep!.close();
    }
    expect(same(returns, whole.returns)).toBe(true);
  });

  it('a target-error comparison of code policies gives the same figures on 1 and 2 workers as its episodes alone', async () => {
    const request: CompareRequest = {
      env: restock.env,
      policies: [restock.policy, readDefinitionFile(path.join(envs, 'restock-fixed.json'))],
      seed: 5,
      start: null,
      noise: 'step',
      episodes: 6000,
      workers: 1,
      method: 't',
      sequence: null,
      level: 0.95,
      bounds: null,
      sigma: null,
      targetError: 1e-6, // never reached: batches of 2,000 and 4,000 episodes up to the cap
      interquartileMean: false,
    };
    const compared = new Float64Array(6000);
    const one = await runComparison(request);
    const two = await runComparison({ ...request, workers: 2, onEpisodes: (p, block) => p === 0 && compared.set(block.returns, block.first) });
    expect(one.episodes).toBe(6000);
    expect(two.estimates.map((e) => e.mean)).toEqual(one.estimates.map((e) => e.mean));
    expect(two.differenceIntervals).toEqual(one.differenceIntervals);
    const alone = await run({ ...restock, seed: 5 }, 6000, 2);
    expect(same(compared, alone.returns)).toBe(true);
  });
});
