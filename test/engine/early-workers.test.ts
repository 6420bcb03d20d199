import { Worker } from 'node:worker_threads';
import { describe, expect, it } from 'vitest';
import { EarlyWorkers } from '../../src/engine/early-workers.js';
import { newClockBuffer } from '../../src/engine/plugin-clock.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import type { FromWorker } from '../../src/engine/worker-messages.js';

/**
 * Threads given back after a run: one that was ready is announced ready to the next run at
 * once; one the run ended before it was ready is not (its own ready message, when it comes,
 * is the only one, so the next run's timings show its real start-up).
 */
const now = () => performance.timeOrigin + performance.now();

/** A stand-in thread that says it is ready after `ms`, as a code worker does once loaded. */
function slowStarter(ms: number): Worker {
  const code = `setTimeout(() => require('node:worker_threads').parentPort.postMessage({ type: 'ready', at: performance.timeOrigin + performance.now(), cpuSeconds: null }), ${ms});`;
  return new Worker(code, { eval: true });
}

async function messagesAfterGiveBack(stillStartingSince: number | null): Promise<FromWorker[]> {
  const kept = new EarlyWorkers('unused', {} as RolloutSpec, 0);
  const worker = slowStarter(150);
  kept.giveBack(worker, newClockBuffer(), () => {}, stillStartingSince);
  const started = kept.take()!;
  const said: FromWorker[] = [];
  started.adopt((m) => said.push(m), (e) => said.push({ type: 'error', message: e.message } as unknown as FromWorker));
  await new Promise((r) => setTimeout(r, 400));
  await worker.terminate();
  return said;
}

describe('threads given back to a kept set', () => {
  it('a thread still starting is not announced ready: its own ready message is the only one, and its start-up counts from its start', async () => {
    const startedAt = now();
    const said = await messagesAfterGiveBack(startedAt);
    expect(said.map((m) => m.type)).toEqual(['ready']);
    const ready = said[0] as Extract<FromWorker, { type: 'ready' }>;
    expect(ready.at! - startedAt).toBeGreaterThanOrEqual(100);
  });

  it('a thread that was ready is announced ready at once', async () => {
    const said = await messagesAfterGiveBack(null);
    // The announcement, then (from this stand-in only) its own late message.
    expect(said.map((m) => m.type)).toEqual(['ready', 'ready']);
  });
});
