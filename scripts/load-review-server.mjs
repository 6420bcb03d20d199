// Latency of the review server's GET /api/runs/:id under load: 200 concurrent list/show
// requests on loopback while an evaluation runs (the scenario of test/server/load.test.ts).
// Run after `npm run build`:  node scripts/load-review-server.mjs [rounds]
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { availableParallelism, cpus, tmpdir } from 'node:os';
import path from 'node:path';
import { buildApp } from '../dist/server/app.js';
import { runStoredEstimate } from '../dist/evaluate/stored-estimate.js';
import { readDefinitionFile } from '../dist/definitions/index.js';
import { openStore } from '../dist/store/open.js';

const rounds = Number(process.argv[2] ?? 5);
const envs = path.resolve(import.meta.dirname, '../envs/textbook');
const storePath = path.join(mkdtempSync(path.join(tmpdir(), 'reckon-load-')), 'runs.sqlite');

async function storeRun(seed, episodes) {
  const db = openStore(storePath);
  const { runId } = await runStoredEstimate({
    db,
    spec: { env: readDefinitionFile(path.join(envs, 'grid-4x3.json')), policy: readDefinitionFile(path.join(envs, 'grid-4x3-optimal.json')), seed, start: null },
    options: { episodes, method: 't', sigma: null, level: 0.95, bounds: null, targetError: null, workers: 1 },
    toolVersion: 'bench',
    shard: null,
    first: 0,
  });
  db.close();
  return runId;
}

const quantile = (sorted, p) => sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
const stored = await storeRun(1, 50_000);
const app = await buildApp({ storePath, toolVersion: 'bench', workers: 1 });
const json = (v) => JSON.stringify(v);
const env = JSON.parse(readFileSync(path.join(envs, 'grid-4x3.json'), 'utf8'));
const policy = JSON.parse(readFileSync(path.join(envs, 'grid-4x3-optimal.json'), 'utf8'));

// The client runs in its own process, so its work does not share the server's thread.
const CLIENT = `
const [base, id, stored] = process.argv.slice(1);
const timings = { stored: [], running: [], list: [] };
const t = performance.now();
await Promise.all(Array.from({ length: 200 }, async (_, k) => {
  const kind = k % 4 === 0 ? 'list' : k % 4 === 1 ? 'running' : 'stored';
  const url = kind === 'list' ? '/api/runs' : '/api/runs/' + (kind === 'running' ? id : stored);
  const t0 = performance.now();
  const response = await fetch(base + url);
  await response.json();
  if (response.status !== 200) throw new Error(url + ': ' + response.status);
  timings[kind].push(performance.now() - t0);
}));
console.log(JSON.stringify({ wall: performance.now() - t, timings }));
`;
const serverTimes = [];
app.addHook('onResponse', async (request, reply) => {
  if (/^\/api\/runs\/\w+$/.test(request.url)) serverTimes.push(reply.elapsedTime);
});
const base = await app.listen({ host: '127.0.0.1', port: 0 });

function client(id) {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--input-type=module', '-e', CLIENT, base, id, stored]);
    let out = '';
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => process.stderr.write(d));
    child.on('exit', (code) => (code === 0 ? resolve(JSON.parse(out)) : reject(new Error(`client exited ${code}`))));
  });
}

const results = [];
for (let round = 0; round < rounds; round++) {
  const posted = await fetch(`${base}/api/evaluations`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: json({ env, policy, episodes: 2_000_000, seed: round }) });
  const { id } = await posted.json();
  await new Promise((r) => setTimeout(r, 300));
  serverTimes.length = 0;
  const { wall, timings } = await client(id);
  const state = await (await fetch(`${base}/api/runs/${id}`)).json();
  const summary = Object.fromEntries(
    Object.entries({ ...timings, server: [...serverTimes] }).map(([k, v]) => {
      const sorted = v.sort((a, b) => a - b);
      return [k, { n: sorted.length, p50: quantile(sorted, 0.5), p95: quantile(sorted, 0.95), max: sorted.at(-1) }];
    }),
  );
  results.push({ wall, summary, evaluation: state.status });
  // Let this round's evaluation finish before the next one starts.
  while ((await (await fetch(`${base}/api/runs/${id}`)).json()).status !== 'done') await new Promise((r) => setTimeout(r, 200));
}
await app.close();

const ms = (x) => `${x.toFixed(1)} ms`;
const median = (xs) => xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)];
console.log(`reckon review server, 200 concurrent requests from another process (50 list, 50 show of the running run, 100 show of a stored 50,000-episode run) while a 2,000,000-episode evaluation runs`);
console.log(`machine: ${cpus()[0]?.model ?? 'unknown'}, ${availableParallelism()} cores, Node ${process.version}; ${rounds} rounds, medians over rounds`);
console.log(`  evaluation still running at the end of the burst in ${results.filter((r) => r.evaluation === 'running').length} of ${rounds} rounds`);
for (const kind of ['stored', 'running', 'list', 'server']) {
  const label = { stored: 'GET /api/runs/:id (stored run)', running: 'GET /api/runs/:id (running run)', list: 'GET /api/runs', server: 'GET /api/runs/:id, time in server' }[kind];
  console.log(`  ${label.padEnd(34)} p50 ${ms(median(results.map((r) => r.summary[kind].p50)))}  p95 ${ms(median(results.map((r) => r.summary[kind].p95)))}  max ${ms(median(results.map((r) => r.summary[kind].max)))}`);
}
console.log(`  all 200 answered in ${ms(median(results.map((r) => r.wall)))} (median round)`);
