import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { readJson, storeTextbookRun, tempStore, waitForRun } from './helpers.js';

/**
 * Many readers while an evaluation writes, on loopback: every request must succeed with
 * complete JSON, and the evaluation must end with all its episodes. Bounded in count (200
 * requests) and in time; latency is measured by scripts/load-review-server.mjs, not here.
 */
describe('review server under load (loopback)', () => {
  let app: FastifyInstance;
  let base: string;
  let storedIds: string[];

  beforeAll(async () => {
    const storePath = tempStore();
    storedIds = [await storeTextbookRun(storePath, 21, 20000), await storeTextbookRun(storePath, 22, 2000)];
    app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    base = await app.listen({ host: '127.0.0.1', port: 0 });
  });
  afterAll(async () => {
    await app?.close();
  });

  it('answers 200 concurrent list and show requests while an evaluation runs, losing nothing', async () => {
    const episodes = 1_000_000;
    const posted = await fetch(`${base}/api/evaluations`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ env: readJson('textbook/grid-4x3.json'), policy: readJson('textbook/grid-4x3-optimal.json'), episodes, seed: 9 }),
    });
    expect(posted.status).toBe(202);
    const { id } = (await posted.json()) as { id: string };

    const urls = Array.from({ length: 200 }, (_, k) => (k % 4 === 0 ? '/api/runs' : `/api/runs/${k % 4 === 1 ? id : storedIds[k % 2]}`));
    const answers = await Promise.all(
      urls.map(async (url) => {
        const response = await fetch(base + url);
        return { url, status: response.status, body: (await response.json()) as Record<string, unknown> | Record<string, unknown>[] };
      }),
    );
    for (const a of answers) expect(a.status, a.url).toBe(200);
    for (const a of answers.filter((x) => x.url === '/api/runs')) expect((a.body as unknown[]).length).toBe(3);
    for (const a of answers.filter((x) => x.url === `/api/runs/${storedIds[0]}`)) expect((a.body as { episodes: number }).episodes).toBe(20000);
    const running = answers.filter((x) => x.url === `/api/runs/${id}`).map((a) => (a.body as { status: string }).status);
    expect(running.every((s) => ['queued', 'running', 'done'].includes(s))).toBe(true);

    const final = (await waitForRun(async () => (await fetch(`${base}/api/runs/${id}`)).json() as Promise<{ status: string }>, 60_000)) as {
      status: string;
      episodes: number;
    };
    expect(final.status).toBe('done');
    expect(final.episodes).toBe(episodes);
    const returns = (await (await fetch(`${base}/api/runs/${id}/returns?points=10`)).json()) as { episodes: number };
    expect(returns.episodes).toBe(episodes);
  });
});
