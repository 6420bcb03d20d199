import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { FIXTURES, reckon } from '../cli/run-cli.js';
import { readJson, tempStore, waitForRun } from './helpers.js';

/**
 * Labels and a note given when a run is started over HTTP are stored with it, as `--label` and
 * `--note` store them from the command line, so `runs list --label` finds runs of either origin;
 * a bad label is refused before anything runs, with the command line's rule and the field.
 */
const grid = readJson('textbook/grid-4x3.json');
const optimal = readJson('textbook/grid-4x3-optimal.json');
const uniform = readJson('textbook/uniform.json');
const OP = path.join(FIXTURES, 'off-policy');
const read = (name: string) => readFileSync(path.join(OP, name), 'utf8');

describe('labels and notes on runs started over HTTP', () => {
  let app: FastifyInstance;
  let storePath: string;
  beforeAll(async () => {
    storePath = tempStore();
    app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
  });
  afterAll(async () => {
    await app?.close();
  });
  const labelled = (run: string) => JSON.parse(reckon(['runs', 'list', '--label', `batch=${run}`, '--store', storePath, '--json']).stdout) as { id: string }[];

  it('an evaluation, a comparison and an off-policy run keep them; runs list --label finds each', async () => {
    const evaluation = await app.inject({
      method: 'POST',
      url: '/api/evaluations',
      payload: { env: grid, policy: optimal, episodes: 500, seed: 1, labels: { batch: 'e', reported: 'yes' }, note: 'posted from a script' },
    });
    expect(evaluation.statusCode, evaluation.body).toBe(202);
    const comparison = await app.inject({
      method: 'POST',
      url: '/api/comparisons',
      payload: { env: grid, policies: [{ name: 'optimal', definition: optimal }, { name: 'uniform', definition: uniform }], episodes: 500, seed: 1, labels: { batch: 'c' }, note: 'two policies' },
    });
    expect(comparison.statusCode, comparison.body).toBe(202);
    const offPolicy = await app.inject({
      method: 'POST',
      url: '/api/offpolicy',
      payload: { log: read('three-episodes.jsonl'), policy: JSON.parse(read('two-state-target.json')), estimators: 'is,wis', resamples: 100, labels: { batch: 'o' }, note: 'from a log' },
    });
    expect(offPolicy.statusCode, offPolicy.body).toBe(201);
    const ids = { e: evaluation.json().id as string, c: comparison.json().id as string, o: offPolicy.json().run_id as string };
    await waitForRun(async () => (await app.inject({ url: `/api/runs/${ids.e}` })).json());
    await waitForRun(async () => (await app.inject({ url: `/api/comparisons/${ids.c}` })).json());
    for (const [batch, id] of Object.entries(ids)) {
      expect(labelled(batch).map((r) => r.id)).toStrictEqual([id]);
      const shown = JSON.parse(reckon(['runs', 'show', id, '--store', storePath, '--json']).stdout);
      expect(shown.labels.batch).toBe(batch);
      expect(shown.notes.map((n: { text: string }) => n.text)).toHaveLength(1);
    }
    const shown = JSON.parse(reckon(['runs', 'show', ids.e, '--store', storePath, '--json']).stdout);
    expect(shown.labels).toStrictEqual({ batch: 'e', reported: 'yes' });
    expect(shown.notes[0].text).toBe('posted from a script');
  });

  it('refuses a bad label key, an empty value and an empty note with 400 naming the field, and starts nothing', async () => {
    const before = JSON.parse(reckon(['runs', 'list', '--store', storePath, '--json', '--all']).stdout).length;
    for (const [extra, field] of [
      [{ labels: { 'has space': 'x' } }, 'labels'],
      [{ labels: { batch: '' } }, 'labels'],
      [{ note: '   ' }, 'note'],
    ] as const) {
      const response = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: optimal, episodes: 100, ...extra } });
      expect(response.statusCode, JSON.stringify(extra)).toBe(400);
      expect(response.json().error).toContain(field);
    }
    expect(JSON.parse(reckon(['runs', 'list', '--store', storePath, '--json', '--all']).stdout)).toHaveLength(before);
  });
});
