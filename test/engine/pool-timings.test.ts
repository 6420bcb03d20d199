import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readDefinitionFile } from '../../src/definitions/read-file.js';
import { runEpisodes, type RunOutcome } from '../../src/engine/pool.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { inlineSource as source, smallGrid, towardsGoal } from '../statistical/small-grid.js';

/**
 * The pool's per-thread timings account for every episode and every thread, and the
 * returns stay a pure function of the spec whatever the worker count. Timings are only
 * checked for consistency (no figure is timed: common practice for tests on shared machines).
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

describe('worker pool timings', () => {
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
});
