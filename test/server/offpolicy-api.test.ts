import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { FIXTURES, reckon } from '../cli/run-cli.js';
import { tempStore } from './helpers.js';

/**
 * `POST /api/offpolicy`: the log sent as its text, the definitions inline; the figures must be
 * those `reckon offpolicy` prints for the same files (the 3-episode check file and the 2-state
 * example), the run is stored like one from the command line, and refusals are the command
 * line's messages with the field they concern.
 */
const OP = path.join(FIXTURES, 'off-policy');
const read = (name: string) => readFileSync(path.join(OP, name), 'utf8');

describe('off-policy evaluations over HTTP', () => {
  let app: FastifyInstance;
  let storePath: string;
  beforeAll(async () => {
    storePath = tempStore();
    app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
  });
  afterAll(async () => {
    await app?.close();
  });
  const body = (extra: Record<string, unknown> = {}) => ({
    log: read('three-episodes.jsonl'),
    policy: JSON.parse(read('two-state-target.json')),
    env: JSON.parse(read('two-state-env.json')),
    behaviour: JSON.parse(read('two-state-behaviour.json')),
    estimators: 'is,wis,pdis,cwpdis',
    resamples: 400,
    seed: 3,
    ...extra,
  });

  it('gives what reckon offpolicy prints for the same files, stores the run, and GET reads it back', async () => {
    const response = await app.inject({ method: 'POST', url: '/api/offpolicy', payload: body() });
    expect(response.statusCode, response.body).toBe(201);
    const posted = response.json();
    expect(response.headers.location).toBe(`/api/offpolicy/${posted.run_id}`);
    const cli = JSON.parse(
      reckon([
        'offpolicy', '--log', path.join(OP, 'three-episodes.jsonl'), '--policy', path.join(OP, 'two-state-target.json'),
        '--env', path.join(OP, 'two-state-env.json'), '--behaviour', path.join(OP, 'two-state-behaviour.json'),
        '--estimator', 'is,wis,pdis,cwpdis', '--resamples', '400', '--seed', '3', '--json', '--no-store',
      ]).stdout,
    );
    for (const key of ['estimates', 'bounds', 'diagnostics', 'max_weight', 'return_bounds', 'discount', 'horizon']) expect(posted[key], key).toStrictEqual(cli[key]);
    // The check values of the 3-episode file (the same as the command line's tests): IS 4.360147, WIS 0.614267.
    expect(posted.estimates[0].estimate).toBeCloseTo(4.360147, 6);
    expect(posted.estimates[1].estimate).toBeCloseTo(0.614267, 6);
    expect(posted.log).toMatchObject({ path: 'log', episodes: 3, steps: 9 });
    const shown = (await app.inject({ url: `/api/offpolicy/${posted.run_id}` })).json();
    expect(shown.estimates).toStrictEqual(posted.estimates);
    const stored = JSON.parse(reckon(['runs', 'show', posted.run_id, '--json', '--store', storePath]).stdout);
    expect(stored.estimates).toStrictEqual(posted.estimates);
  });

  it('refuses bad logs, code, paths and options with the command line\'s message and the field', async () => {
    const lines = read('three-episodes.jsonl').split('\n');
    lines[2] = lines[2].replace('"behaviour_prob": 0.5', '"behaviour_prob": 0');
    const cases: [Record<string, unknown>, string, RegExp][] = [
      [{ log: lines.join('\n') }, 'log', /^log: line 3: behaviour_prob must be in \(0, 1\]/],
      [{ policy: { kind: 'module', path: './p.js' } }, 'policy', /"kind": "module" runs code, so the server refuses it/],
      [{ behaviour: { kind: 'epsilon', epsilon: 0.1, base: { path: 'b.json' } } }, 'behaviour', /"path" names a file/],
      [{ env: undefined }, 'behaviour', /needs "env" with a gridworld or tabular environment/],
      [{ estimators: 'is,magic' }, 'estimators', /--estimator: must be one or more of is, wis/],
      [{ confidence: 2 }, 'confidence', /--confidence/],
      [{ behaviour: JSON.parse(read('two-state-target.json')), behaviour_name: 'wrong' }, 'log', /^log: line 2: behaviour_prob 0\.3 differs from wrong's 0\.8/],
    ];
    for (const [extra, field, message] of cases) {
      const response = await app.inject({ method: 'POST', url: '/api/offpolicy', payload: body(extra) });
      expect(response.statusCode, JSON.stringify(extra)).toBe(400);
      expect(response.json().error).toMatch(message);
      expect(response.json().field, JSON.stringify(extra)).toBe(field);
    }
    const unknown = await app.inject({ method: 'POST', url: '/api/offpolicy', payload: { ...body(), episodes: 3 } });
    expect(unknown.statusCode).toBe(400);
  });
});
