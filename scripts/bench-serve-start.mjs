// What a run started over HTTP costs in `reckon serve` on a fresh evaluation thread against a
// thread kept from the run before: the time until the POST is answered (the run exists), the
// time until the run is done, and the process's CPU seconds, for the demo warehouse at
// several episode counts. Each round builds a new server (its first run starts a thread), then
// runs the same request again (on the kept thread); rounds interleaved, medians.
// Run after `npm run build`:  node scripts/bench-serve-start.mjs [rounds]
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';
import { buildApp } from '../dist/server/app.js';

const rounds = Number(process.argv[2] ?? 3);
const envs = path.resolve(import.meta.dirname, '../envs');
const env = JSON.parse(readFileSync(path.join(envs, 'warehouse.json'), 'utf8'));
const policy = JSON.parse(readFileSync(path.join(envs, 'picker-careful.json'), 'utf8'));
const SIZES = [20_000, 200_000, 2_000_000];

async function evaluate(app, episodes) {
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const posted = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { env, policy, episodes, seed: 5 } });
  const answered = performance.now() - t0;
  const { id } = posted.json();
  let run;
  for (;;) {
    run = (await app.inject({ url: `/api/runs/${id}` })).json();
    if (run.status !== 'queued' && run.status !== 'running') break;
    await new Promise((resolve) => setTimeout(resolve, 5));
  }
  const cpu = process.cpuUsage(cpu0);
  if (run.status !== 'done') throw new Error(`run ${id} ended ${run.status}`);
  return { answeredMs: answered, doneMs: performance.now() - t0, cpuSeconds: (cpu.user + cpu.system) / 1e6, mean: run.mean };
}

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
const results = Object.fromEntries(SIZES.map((n) => [n, { fresh: [], kept: [] }]));
const load = loadavg();
for (let r = 0; r < rounds; r++) {
  for (const episodes of SIZES) {
    const dir = mkdtempSync(path.join(tmpdir(), 'reckon-serve-start-'));
    const app = await buildApp({ storePath: path.join(dir, 'runs.sqlite'), toolVersion: 'bench' });
    try {
      const fresh = await evaluate(app, episodes);
      const kept = await evaluate(app, episodes);
      if (fresh.mean !== kept.mean) throw new Error(`the kept thread gave mean ${kept.mean}, the fresh one ${fresh.mean}`);
      results[episodes].fresh.push(fresh);
      results[episodes].kept.push(kept);
    } finally {
      await app.close();
      rmSync(dir, { recursive: true, force: true });
    }
  }
}
console.log(`load average ${load.map((x) => x.toFixed(1)).join(' ')} before, ${loadavg().map((x) => x.toFixed(1)).join(' ')} after; ${rounds} rounds, medians`);
console.log('');
console.log('| episodes | POST answered: fresh thread | kept thread | run done: fresh | kept | process CPU: fresh | kept |');
console.log('|---:|---:|---:|---:|---:|---:|---:|');
for (const n of SIZES) {
  const { fresh, kept } = results[n];
  const m = (xs, f) => median(xs.map(f));
  console.log(
    `| ${n.toLocaleString('en')} | ${m(fresh, (x) => x.answeredMs).toFixed(0)} ms | ${m(kept, (x) => x.answeredMs).toFixed(0)} ms | ` +
      `${m(fresh, (x) => x.doneMs).toFixed(0)} ms | ${m(kept, (x) => x.doneMs).toFixed(0)} ms | ${m(fresh, (x) => x.cpuSeconds).toFixed(2)} s | ${m(kept, (x) => x.cpuSeconds).toFixed(2)} s |`,
  );
}
