import { afterAll, describe, expect, it } from 'vitest';
import { readDefinitionFile } from '../../src/definitions/index.js';
import { prepareEvaluation } from '../../src/server/evaluation-job.js';
import type { EvaluationTask } from '../../src/server/evaluation-messages.js';
import { EvaluationThreads } from '../../src/server/evaluation-threads.js';
import { openStore } from '../../src/store/open.js';
import { findRun, loadEpisodes } from '../../src/store/runs.js';
import { envPath, tempStore } from './helpers.js';

/**
 * The server keeps its evaluation threads between runs: the runs after the first need no new
 * thread, and a reused thread gives the episodes a fresh one gives (a run is a pure function
 * of its definitions, seed and episode count; DEVELOPERS.md, "Seeding scheme").
 */
const storePath = tempStore();
const db = openStore(storePath);
const threads = new EvaluationThreads({ storePath, toolVersion: 'test' }, 1);
afterAll(async () => {
  await threads.close();
  db.close();
});

function task(seed: number): EvaluationTask {
  return {
    kind: 'estimate',
    spec: { env: readDefinitionFile(envPath('textbook/grid-4x3.json')), policy: readDefinitionFile(envPath('textbook/grid-4x3-optimal.json')), seed, start: null, noise: 'step' },
    options: { episodes: 3000, method: 't', sigma: null, level: 0.95, bounds: null, targetError: null, workers: 1 },
  };
}

async function run(seed: number): Promise<{ status: string; returns: Float64Array }> {
  const job = await prepareEvaluation(db, threads, task(seed));
  const outcome = await job.run(new AbortController().signal, () => {});
  const record = findRun(db, job.id)!;
  return { status: outcome.status, returns: loadEpisodes(db, record).returns };
}

describe('warm evaluation threads', () => {
  it('runs one evaluation after another on one thread, with the episodes of a fresh thread', async () => {
    const first = await run(7);
    const other = await run(8);
    const again = await run(7);
    expect([first.status, other.status, again.status]).toEqual(['done', 'done', 'done']);
    expect(threads.started).toBe(1);
    expect(Buffer.from(again.returns.buffer).equals(Buffer.from(first.returns.buffer))).toBe(true);
    expect(Buffer.from(other.returns.buffer).equals(Buffer.from(first.returns.buffer))).toBe(false);
  });

  it('keeps the thread after a bad request, which is refused with the command line\'s message', async () => {
    const bad: EvaluationTask = { ...task(1), spec: { ...task(1).spec, start: 'nowhere' } } as EvaluationTask;
    await expect(prepareEvaluation(db, threads, bad)).rejects.toThrow(/--start/);
    expect((await run(7)).status).toBe('done');
    expect(threads.started).toBe(1);
  });
});
