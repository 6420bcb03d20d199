import { writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { hostname } from 'node:os';
import Database from 'better-sqlite3';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { reckon } from '../cli/run-cli.js';
import { readJson, storeTextbookRun, tempStore, waitForRun } from './helpers.js';

/**
 * The analysis is timed anew by each reader, and `seconds` and the projection's times include
 * it; every other key must agree.
 */
function withoutAnalysisTime(json: Record<string, any>): Record<string, unknown> {
  const { analysis_seconds: _analysis, seconds: _total, ...rest } = json;
  if (Array.isArray(rest.projection)) rest.projection = rest.projection.map((row: Record<string, unknown>) => ({ ...row, seconds: null }));
  return rest;
}

const grid = readJson('textbook/grid-4x3.json');
const optimal = readJson('textbook/grid-4x3-optimal.json');

describe('review server API (fastify inject)', () => {
  let app: FastifyInstance;
  let storePath: string;
  let storedId: string;

  beforeAll(async () => {
    storePath = tempStore();
    storedId = await storeTextbookRun(storePath, 11);
    await storeTextbookRun(storePath, 12, 500);
    app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
  });
  afterAll(async () => {
    await app?.close();
  });

  it('lists the stored runs with the fields of runs list --json, newest first', async () => {
    const response = await app.inject({ url: '/api/runs' });
    expect(response.statusCode).toBe(200);
    const rows = response.json();
    const cli = JSON.parse(reckon(['runs', 'list', '--json', '--store', storePath]).stdout);
    // The command line is the contract: same runs, same order, same fields (plus progress).
    expect(rows.map((r: { id: string }) => r.id)).toEqual(cli.map((r: { id: string }) => r.id));
    for (const [k, row] of rows.entries()) expect({ ...row, progress: undefined }).toEqual({ ...cli[k], progress: undefined });
    const filtered = (await app.inject({ url: '/api/runs?policy=optimal&limit=1' })).json();
    expect(filtered).toHaveLength(1);
  });

  it('shows a run as runs show --json does', async () => {
    const response = await app.inject({ url: `/api/runs/${storedId}` });
    expect(response.statusCode).toBe(200);
    const cli = JSON.parse(reckon(['runs', 'show', storedId, '--json', '--store', storePath]).stdout);
    const { progress, ...body } = response.json();
    expect(progress).toBeNull();
    expect(withoutAnalysisTime(body)).toEqual(withoutAnalysisTime(cli));
    const again = (await app.inject({ url: `/api/runs/${storedId}?ci=bootstrap` })).json();
    expect(again.ci.method).toBe(JSON.parse(reckon(['runs', 'show', storedId, '--json', '--ci', 'bootstrap', '--store', storePath]).stdout).ci.method);
  });

  it('counts terminal and length events given as repeated event options, as runs show --risk does, and names the terminals', async () => {
    const url = `/api/runs/${storedId}?risk=true&event=${encodeURIComponent('terminal=+')}&event=${encodeURIComponent('terminal=-')}&event=${encodeURIComponent('length>=2000')}`;
    const response = await app.inject({ url });
    expect(response.statusCode).toBe(200);
    const body = response.json();
    const cli = JSON.parse(reckon(['runs', 'show', storedId, '--json', '--risk', '--event', 'terminal=+', '--event', 'terminal=-', '--event', 'length>=2000', '--store', storePath]).stdout);
    expect(body.risk).toEqual(cli.risk);
    expect(body.terminals).toEqual([{ name: '+', states: 1 }, { name: '-', states: 1 }]);
    const [plus, minus, truncated] = body.risk.events;
    expect(plus.count + minus.count + truncated.count).toBe(body.episodes); // every episode ends in one of them
    const bad = await app.inject({ url: `/api/runs/${storedId}?risk=true&event=${encodeURIComponent('terminal=Q')}` });
    expect(bad.statusCode).toBe(400);
    expect(bad.json().error).toMatch(/no terminal cell letter or terminal state is named "Q"/);
  });

  it('gives the risk figures as runs show --risk does, and the CDF plot; a bad risk option is a 400', async () => {
    const withRisk = (await app.inject({ url: `/api/runs/${storedId}?risk=true&event=return<0` })).json();
    const cli = JSON.parse(reckon(['runs', 'show', storedId, '--json', '--risk', '--event', 'return<0', '--store', storePath]).stdout);
    expect(withRisk.risk).toEqual(cli.risk);
    expect((await app.inject({ url: `/api/runs/${storedId}?risk=maybe` })).statusCode).toBe(400);
    expect((await app.inject({ url: `/api/runs/${storedId}?tail=2` })).json().error).toMatch(/--tail: must be a fraction/);
    const cdf = await app.inject({ url: `/api/runs/${storedId}/plots/cdf` });
    expect(cdf.statusCode).toBe(200);
    expect(JSON.stringify(cdf.json())).toMatch(/DKW band/);
  });

  it('gives per-episode returns, whole or downsampled', async () => {
    const whole = (await app.inject({ url: `/api/runs/${storedId}/returns` })).json();
    expect(whole.episodes).toBe(4000);
    expect(whole.return).toHaveLength(4000);
    const exported = JSON.parse(reckon(['runs', 'export', storedId, '--format', 'json', '--store', storePath]).stdout);
    expect(whole.return).toEqual(exported.returns);
    const thin = (await app.inject({ url: `/api/runs/${storedId}/returns?points=100` })).json();
    expect(thin.stride).toBe(40);
    expect(thin.episode.slice(0, 3)).toEqual([0, 40, 80]);
    expect(thin.return[2]).toBe(exported.returns[80]);
  });

  it('answers 404 for an unknown run, plot or route', async () => {
    for (const url of ['/api/runs/nosuchrun', '/api/runs/nosuchrun/returns', `/api/runs/${storedId}/plots/pie`, '/api/nothing']) {
      const response = await app.inject({ url });
      expect(response.statusCode, url).toBe(404);
      expect(response.json().error, url).toBeTypeOf('string');
    }
    expect((await app.inject({ url: '/api/runs/nosuchrun' })).json().error).toMatch(/^run nosuchrun: no such run/);
  });

  it('answers 400 with the command line\'s message for bad options', async () => {
    const response = await app.inject({ url: `/api/runs/${storedId}?ci=magic` });
    expect(response.statusCode).toBe(400);
    const cli = reckon(['runs', 'show', storedId, '--ci', 'magic', '--store', storePath]);
    expect(cli.code).toBe(2);
    expect(`reckon: ${response.json().error}\n`).toBe(cli.stderr);
    expect((await app.inject({ url: '/api/runs?colour=red' })).statusCode).toBe(400);
  });

  it('answers 400 with the command line\'s message for a bad definition, naming the field', async () => {
    const bad = { ...grid, cells: { ...(grid.cells as object), '.': { slip: -0.2 } } };
    const response = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: bad, policy: optimal, episodes: 100 } });
    expect(response.statusCode).toBe(400);
    expect(response.json().field).toBe('env');
    // The same definition in a file called "env", through the command line.
    const folder = path.dirname(storePath);
    writeFileSync(path.join(folder, 'env'), JSON.stringify(bad));
    const cli = reckon(['estimate', '--env', 'env', '--policy', path.resolve('envs/textbook/grid-4x3-optimal.json'), '--no-store'], { cwd: folder });
    expect(cli.code).toBe(2);
    expect(`reckon: ${response.json().error}\n`).toBe(cli.stderr);

    const episodes = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: optimal, episodes: 1 } });
    expect(episodes.statusCode).toBe(400);
    expect(episodes.json()).toEqual({ error: expect.stringMatching(/^--episodes: must be between 2/), field: 'episodes' });
    const unknownKey = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: optimal, colour: 'red' } });
    expect(unknownKey.statusCode).toBe(400);
    expect(unknownKey.json().error).toMatch(/colour/);
    const policyState = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: { kind: 'table', states: { '9,9': 'up' } } } });
    expect(policyState.json().field).toBe('policy');
  });

  it('refuses definitions that run code or name files', async () => {
    const cases = [
      { env: { kind: 'module', path: './restock.js' }, policy: { kind: 'uniform' } },
      { env: grid, policy: { kind: 'module', path: './p.js' } },
      { env: grid, policy: { kind: 'epsilon', epsilon: 0.1, base: { kind: 'module', path: './p.js' } } },
      { env: grid, policy: { kind: 'epsilon', epsilon: 0.1, base: { path: 'grid-4x3-optimal.json' } } },
      { env: { kind: 'process', command: ['python3', './warehouse_env.py'] }, policy: { kind: 'uniform' } },
      { env: grid, policy: { kind: 'process', name: 'careful' } },
    ];
    for (const payload of cases) {
      const response = await app.inject({ method: 'POST', url: '/api/evaluations', payload });
      expect(response.statusCode).toBe(400);
      expect(response.json().error).toMatch(/refuses it|no file paths/);
    }
  });

  it('limits the body size and wants JSON', async () => {
    const big = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: { ...grid, padding: 'x'.repeat(1_100_000) }, policy: optimal } });
    expect(big.statusCode).toBe(413);
    const text = await app.inject({ method: 'POST', url: '/api/evaluations', headers: { 'content-type': 'text/plain' }, payload: 'hello' });
    expect(text.statusCode).toBe(415);
  });

  it('refuses a Host that is not a loopback name (DNS rebinding)', async () => {
    const response = await app.inject({ url: '/api/runs', headers: { host: 'attacker.example:7070' } });
    expect(response.statusCode).toBe(403);
    expect((await app.inject({ url: '/api/runs', headers: { host: '127.0.0.1:7070' } })).statusCode).toBe(200);
  });

  it('runs a posted evaluation off the request thread into the same store the command line reads', async () => {
    const response = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: optimal, env_name: 'grid-4x3.json', episodes: 20000, seed: 5 } });
    expect(response.statusCode).toBe(202);
    const { id } = response.json();
    expect(response.headers.location).toBe(`/api/runs/${id}`);
    const done = (await waitForRun(async () => (await app.inject({ url: `/api/runs/${id}` })).json())) as Record<string, any>;
    expect(done.status).toBe('done');
    expect(done.episodes).toBe(20000);
    // Russell & Norvig, AIMA 3rd ed., Fig. 17.3: U(1,1) = 0.705 under the optimal policy.
    expect(done.ci.low).toBeLessThan(0.705);
    expect(done.ci.high).toBeGreaterThan(0.705);
    // The command line sees the same run, and a command-line estimate with that seed agrees bit for bit.
    const shown = JSON.parse(reckon(['runs', 'show', id, '--json', '--store', storePath]).stdout);
    expect(shown.mean).toBe(done.mean);
    const direct = JSON.parse(reckon(['estimate', '--env', 'envs/textbook/grid-4x3.json', '--policy', 'envs/textbook/grid-4x3-optimal.json', '--episodes', '20000', '--seed', '5', '--json', '--no-store']).stdout);
    expect(direct.mean).toBe(done.mean);
    // Plots of the new run carry its data.
    const convergence = (await app.inject({ url: `/api/runs/${id}/plots/convergence` })).json();
    const series = convergence.data.values;
    expect(series.at(-1).episodes).toBe(20000);
    expect(series.at(-1).mean).toBeCloseTo(done.mean, 12);
    expect(series.at(-1).high - series.at(-1).mean).toBeCloseTo(done.ci.half_width, 12);
  });
});

describe('review server queue and token', () => {
  it('answers 429 when the queue is full, and leaves a stopped run resumable', async () => {
    const storePath = tempStore();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1, concurrency: 1, queueSize: 1, maxEpisodes: 1e9 });
    try {
      const long = { env: grid, policy: optimal, episodes: 500_000_000, seed: 1 };
      const first = await app.inject({ method: 'POST', url: '/api/evaluations', payload: long });
      const second = await app.inject({ method: 'POST', url: '/api/evaluations', payload: long });
      const third = await app.inject({ method: 'POST', url: '/api/evaluations', payload: long });
      expect([first.statusCode, second.statusCode, third.statusCode]).toEqual([202, 202, 429]);
      expect(third.json().error).toMatch(/busy/);
      expect((await app.inject({ url: `/api/runs/${second.json().id}` })).json().status).toBe('queued');
      await app.close();
      const cli = JSON.parse(reckon(['runs', 'list', '--json', '--store', storePath]).stdout);
      expect(cli.find((r: { id: string }) => r.id === first.json().id).status).toBe('interrupted');
    } finally {
      await app.close();
    }
  });

  it('requires the token on every request when one is set', async () => {
    const storePath = tempStore();
    await storeTextbookRun(storePath, 3, 100);
    const app = await buildApp({ storePath, toolVersion: 'test', token: 'sesame-123456' });
    try {
      expect((await app.inject({ url: '/api/runs' })).statusCode).toBe(401);
      expect((await app.inject({ url: '/' })).statusCode).toBe(401);
      expect((await app.inject({ url: '/api/runs', headers: { authorization: 'Bearer wrong-token' } })).statusCode).toBe(401);
      expect((await app.inject({ url: '/api/runs', headers: { authorization: 'Bearer sesame-123456' } })).statusCode).toBe(200);
      expect((await app.inject({ url: '/api/runs?token=sesame-123456' })).statusCode).toBe(200);
      expect((await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: { kind: 'module', path: 'x.js' } } })).statusCode).toBe(401);
    } finally {
      await app.close();
    }
  });

  it('refuses to listen beyond loopback without a token', () => {
    const result = reckon(['serve', '--host', '0.0.0.0', '--port', '0']);
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/^reckon: --host: "0.0.0.0" lets other machines reach the server; give --token/);
  });
});

describe('comparisons over HTTP', () => {
  it('runs a posted comparison into the store; GET shows what runs show --json prints', async () => {
    const storePath = tempStore();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    try {
      const uniform = readJson('textbook/uniform.json');
      const payload = { env: grid, env_name: 'grid-4x3.json', policies: [{ name: 'optimal', definition: optimal }, { name: 'uniform', definition: uniform }], episodes: 4000, seed: 2 };
      const posted = await app.inject({ method: 'POST', url: '/api/comparisons', payload });
      expect(posted.statusCode).toBe(202);
      const { id } = posted.json();
      const done = (await waitForRun(async () => (await app.inject({ url: `/api/comparisons/${id}` })).json())) as Record<string, any>;
      expect(done.status).toBe('done');
      const cli = JSON.parse(reckon(['runs', 'show', id, '--json', '--store', storePath]).stdout);
      const { progress, ...rest } = done;
      expect(progress).toBeNull();
      expect(withoutAnalysisTime(rest)).toEqual(withoutAnalysisTime(cli));
      const members = cli.members as string[];
      expect(members).toHaveLength(2);
      expect(cli.policies.map((p: { run_id: string }) => p.run_id)).toEqual(members);
      // Russell & Norvig's optimal policy (0.705 from the start, AIMA Fig. 17.3) beats moving at random.
      expect(done.ranking).toEqual([0, 1]);
      expect(done.differences[0].low).toBeGreaterThan(0);
      const plot = (await app.inject({ url: `/api/comparisons/${id}/plot` })).json();
      expect(plot.data.values).toEqual([{ pair: 'optimal − uniform', mean: done.differences[0].mean, low: done.differences[0].low, high: done.differences[0].high }]);
      // Each policy's member run is an ordinary run with its own page.
      const member = (await app.inject({ url: `/api/runs/${members[0]}` })).json();
      expect(member.mean).toBe(done.policies[0].mean);
    } finally {
      await app.close();
    }
  });

  it('refuses one policy, module kinds, and fixed-sample intervals with a target error, as compare does', async () => {
    const storePath = tempStore();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    try {
      const one = await app.inject({ method: 'POST', url: '/api/comparisons', payload: { env: grid, policies: [{ definition: optimal }] } });
      expect(one.statusCode).toBe(400);
      expect(one.json().error).toMatch(/^request: policies .*at least/);
      const code = await app.inject({ method: 'POST', url: '/api/comparisons', payload: { env: grid, policies: [{ definition: optimal }, { definition: { kind: 'module', path: 'p.js' } }] } });
      expect(code.statusCode).toBe(400);
      expect(code.json().error).toMatch(/refuses it/);
      const ci = await app.inject({ method: 'POST', url: '/api/comparisons', payload: { env: grid, policies: [{ definition: optimal }, { definition: optimal }], target_error: 0.1, ci: 'bootstrap' } });
      expect(ci.statusCode).toBe(400);
      const cli = reckon(['compare', '--env', 'envs/textbook/grid-4x3.json', '--policy', 'envs/textbook/grid-4x3-optimal.json', '--policy', 'envs/textbook/grid-4x3-optimal.json', '--target-error', '0.1', '--ci', 'bootstrap', '--no-store']);
      expect(`reckon: ${ci.json().error}\n`).toBe(cli.stderr);
      const badPolicy = await app.inject({ method: 'POST', url: '/api/comparisons', payload: { env: grid, policies: [{ definition: optimal }, { name: 'mine', definition: { kind: 'table', states: { '9,9': 'up' } } }] } });
      expect(badPolicy.json().field).toBe('policies[1]');
    } finally {
      await app.close();
    }
  });
});

describe('runs whose process is gone, and failed runs', () => {
  it('a run left running by a process that died reads as interrupted; a failed run shows its reason', async () => {
    const storePath = tempStore();
    const killed = await storeTextbookRun(storePath, 31, 500);
    const failed = await storeTextbookRun(storePath, 32, 500);
    // What a SIGKILL leaves behind: status running, owned by a process that no longer exists.
    const gone = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const db = new Database(storePath);
    db.prepare("UPDATE runs SET status = 'running', owner_pid = ?, owner_host = ? WHERE id = ?").run(Number(gone.stdout), hostname(), killed);
    db.prepare("UPDATE runs SET status = 'failed', error = ? WHERE id = ?").run('the environment (step) hung at episode 7, step 2: no answer within 10 s', failed);
    db.close();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    try {
      const list = (await app.inject({ url: '/api/runs' })).json() as { id: string; status: string }[];
      expect(list.find((r) => r.id === killed)!.status).toBe('interrupted');
      expect((await app.inject({ url: `/api/runs/${killed}` })).json().status).toBe('interrupted');
      const shown = (await app.inject({ url: `/api/runs/${failed}` })).json();
      expect(shown.status).toBe('failed');
      expect(shown.error).toContain('hung at episode 7, step 2');
    } finally {
      await app.close();
    }
  });
});

describe('stopping a run over the API', () => {
  it('POST /api/runs/:id/stop leaves a running run interrupted with its episodes; a finished run is 409; a form post is 415', async () => {
    const storePath = tempStore();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1, maxEpisodes: 1e9 });
    try {
      const posted = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env: grid, policy: optimal, episodes: 500_000_000, seed: 3 } });
      const { id } = posted.json();
      for (let i = 0; i < 200; i++) {
        const run = (await app.inject({ url: `/api/runs/${id}` })).json();
        if (run.status === 'running' && run.episodes > 0) break;
        await new Promise((r) => setTimeout(r, 50));
      }
      const form = await app.inject({ method: 'POST', url: `/api/runs/${id}/stop`, headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: '' });
      expect(form.statusCode).toBe(415);
      const stop = await app.inject({ method: 'POST', url: `/api/runs/${id}/stop`, payload: {} });
      expect(stop.statusCode).toBe(202);
      const ended = await waitForRun(async () => (await app.inject({ url: `/api/runs/${id}` })).json());
      expect(ended.status).toBe('interrupted');
      const cli = JSON.parse(reckon(['runs', 'show', id, '--json', '--store', storePath]).stdout);
      expect(cli.status).toBe('interrupted');
      expect(cli.episodes).toBeGreaterThan(0);
      const again = await app.inject({ method: 'POST', url: `/api/runs/${id}/stop`, payload: {} });
      expect(again.statusCode).toBe(409);
      expect(again.json().error).toContain('is interrupted, not running on this server');
    } finally {
      await app.close();
    }
  });

  it('POST /api/runs/:id/stop on a running comparison leaves it and its members interrupted, and its page says how to go on', async () => {
    const storePath = tempStore();
    const app = await buildApp({ storePath, toolVersion: 'test', workers: 1, maxEpisodes: 1e9 });
    const uniform = readJson('textbook/uniform.json');
    let id = '';
    try {
      const payload = { env: grid, policies: [{ name: 'optimal', definition: optimal }, { name: 'uniform', definition: uniform }], episodes: 300_000_000, seed: 4 };
      const posted = await app.inject({ method: 'POST', url: '/api/comparisons', payload });
      expect(posted.statusCode, posted.body).toBe(202);
      id = posted.json().id;
      for (let i = 0; i < 200; i++) {
        const members = JSON.parse(reckon(['runs', 'list', '--all', '--store', storePath, '--json']).stdout) as { parent_id: string | null; episodes: number }[];
        if (members.some((m) => m.parent_id === id && m.episodes > 0)) break;
        await new Promise((r) => setTimeout(r, 50));
      }
      const stop = await app.inject({ method: 'POST', url: `/api/runs/${id}/stop`, payload: {} });
      expect(stop.statusCode, stop.body).toBe(202);
      const ended = await waitForRun(async () => (await app.inject({ url: `/api/comparisons/${id}` })).json());
      expect(ended.status).toBe('interrupted');
      // Policies run block by block, so a stop can fall between two members' blocks: then there
      // are no paired episodes yet, and the page says how to go on instead of failing.
      if (ended.figures_unavailable) expect(ended.figures_unavailable).toContain(`reckon runs resume ${id}`);
      else expect(ended.episodes).toBeGreaterThan(0);
    } finally {
      await app.close();
    }
    const runs = JSON.parse(reckon(['runs', 'list', '--all', '--store', storePath, '--json']).stdout) as { id: string; parent_id: string | null; status: string; episodes: number }[];
    const members = runs.filter((r) => r.parent_id === id);
    expect(members).toHaveLength(2);
    expect(members.every((m) => m.status === 'interrupted')).toBe(true);
    expect(members.some((m) => m.episodes > 0)).toBe(true);
    expect(runs.find((r) => r.id === id)?.status).toBe('interrupted');
  });
});
