import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { readDefinitionFile } from '../../src/definitions/index.js';
import { runStoredEstimate } from '../../src/evaluate/stored-estimate.js';
import { openStore } from '../../src/store/open.js';

export const ROOT = path.resolve(import.meta.dirname, '../..');
export const envPath = (name: string) => path.join(ROOT, 'envs', name);
export const readJson = (name: string) => JSON.parse(readFileSync(envPath(name), 'utf8')) as Record<string, unknown>;

export function tempStore(): string {
  return path.join(mkdtempSync(path.join(tmpdir(), 'reckon-server-')), 'runs.sqlite');
}

/** Stores one finished run of the Russell & Norvig 4×3 grid (envs/textbook), as `reckon estimate` would. */
export async function storeTextbookRun(storePath: string, seed: number, episodes = 4000): Promise<string> {
  const db = openStore(storePath);
  try {
    const { runId } = await runStoredEstimate({
      db,
      spec: { env: readDefinitionFile(envPath('textbook/grid-4x3.json')), policy: readDefinitionFile(envPath('textbook/grid-4x3-optimal.json')), seed, start: null, noise: 'step' },
      options: { episodes, method: 't', sigma: null, level: 0.95, bounds: null, targetError: null, workers: 1 },
      toolVersion: 'test',
      shard: null,
      first: 0,
    });
    return runId;
  } finally {
    db.close();
  }
}

/** Polls until the run is no longer queued or running (the server's own status). */
export async function waitForRun(get: () => Promise<{ status: string }>, timeoutMs = 30_000): Promise<{ status: string }> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const run = await get();
    if (run.status !== 'queued' && run.status !== 'running') return run;
    if (Date.now() > until) throw new Error(`run still ${run.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}
