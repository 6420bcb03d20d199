import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readDefinitionFile } from '../../src/definitions/read-file.js';
import { BlockMemory, blockMemory } from '../../src/engine/episode-block.js';
import { runEpisodes } from '../../src/engine/pool.js';
import { serveBlocks } from '../../src/engine/worker-loop.js';
import type { FromWorker } from '../../src/engine/worker-messages.js';
import { MessageChannel } from 'node:worker_threads';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { inlineSource as source, smallGrid, towardsGoal } from '../statistical/small-grid.js';

/**
 * Reused block memory (RunOptions.reuseBlocks) changes where the results are written, never
 * what they are: the episodes of a spec are a pure function of it (DEVELOPERS.md, "Seeding
 * scheme"), so every array must equal that of a run on fresh memory, bit for bit (common
 * practice for a change of memory layout).
 */
const envs = path.resolve(import.meta.dirname, '../../envs');
const restock: RolloutSpec = {
  env: readDefinitionFile(path.join(envs, 'restock-env.json')),
  policy: readDefinitionFile(path.join(envs, 'restock-base-stock.json')),
  seed: 5,
  start: null,
};
const grid: RolloutSpec = { env: { json: smallGrid, source }, policy: { json: towardsGoal, source }, seed: 5, start: null };

async function run(spec: RolloutSpec, count: number, workers: number, reuseBlocks: boolean) {
  const returns = new Float64Array(count);
  const lengths = new Uint32Array(count);
  const finals = new Int32Array(count);
  const buffers = new Set<ArrayBufferLike>();
  let blocks = 0;
  await runEpisodes(spec, {
    first: 0,
    count,
    workers,
    reuseBlocks,
    blockSeconds: 1e-7, // blocks of the smallest size (16), so their memory fits every later block
    onBlock: (b) => {
      expect(b.returns.length).toBe(b.count);
      returns.set(b.returns, b.first);
      lengths.set(b.lengths, b.first);
      finals.set(b.finals, b.first);
      buffers.add(b.returns.buffer);
      blocks++;
    },
  });
  return { returns, lengths, finals, blocks, distinctBuffers: buffers.size };
}

const bytes = (a: Float64Array | Uint32Array | Int32Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

describe('reused block memory', () => {
  it('gives the results of fresh memory, on one thread, on a worker beside this thread, and on code workers', async () => {
    for (const [spec, count] of [[grid, 20_000], [restock, 2_000]] as const) {
      for (const workers of [1, 2]) {
        const fresh = await run(spec, count, workers, false);
        const reused = await run(spec, count, workers, true);
        expect(bytes(reused.returns).equals(bytes(fresh.returns))).toBe(true);
        expect(bytes(reused.lengths).equals(bytes(fresh.lengths))).toBe(true);
        expect(bytes(reused.finals).equals(bytes(fresh.finals))).toBe(true);
        expect(fresh.distinctBuffers).toBe(fresh.blocks);
        // Blocks run by this thread come back as the same arrays: memory was in fact filled
        // again (a transferred array arrives as a new object, so worker blocks are checked below).
        if (spec === grid) expect(reused.distinctBuffers).toBeLessThan(reused.blocks);
      }
    }
  }, 120_000);

  it('hands out the smallest spare that fits, sends the largest away, and views only the block', () => {
    const memory = new BlockMemory();
    const small = memory.take(0, 10);
    const large = memory.take(10, 1000);
    expect(small.returns.length).toBe(10);
    expect(small.returns.buffer.byteLength).toBe(16 * 8); // capacities are powers of two from 16
    expect(large.returns.buffer.byteLength).toBe(1024 * 8);
    memory.giveBack(blockMemory(small));
    memory.giveBack(blockMemory(large));
    const next = memory.take(1010, 12);
    expect(next.returns.buffer).toBe(small.returns.buffer);
    expect(next.lengths.length).toBe(12);
    expect(memory.spare()?.returns).toBe(large.returns.buffer);
    expect(memory.spare()).toBeNull();
  });

  it('a worker fills the memory sent back with a run request again', async () => {
    const { port1, port2 } = new MessageChannel();
    /** What each block's first return held before the rollout wrote it: 0 in fresh memory. */
    const before: number[] = [];
    serveBlocks(port1, (block) => {
      before.push(block.returns[0]);
      block.returns.fill(block.first + 1);
      return block.count;
    });
    const messages: FromWorker[] = [];
    let arrived: (() => void) | null = null;
    port2.on('message', (m: FromWorker) => {
      messages.push(m);
      arrived?.();
    });
    const next = () => new Promise<FromWorker>((resolve) => {
      const have = messages.shift();
      if (have) return resolve(have);
      arrived = () => {
        arrived = null;
        resolve(messages.shift()!);
      };
    });
    expect((await next()).type).toBe('ready');
    port2.postMessage({ type: 'run', first: 0, count: 16 });
    const first = await next();
    if (first.type !== 'block') throw new Error(first.type);
    const spare = { returns: first.returns.buffer as ArrayBuffer, lengths: first.lengths.buffer as ArrayBuffer, finals: first.finals.buffer as ArrayBuffer };
    port2.postMessage({ type: 'run', first: 16, count: 10, spare }, [spare.returns, spare.lengths, spare.finals]);
    const second = await next();
    if (second.type !== 'block') throw new Error(second.type);
    expect(second.returns.length).toBe(10);
    expect(Array.from(second.returns)).toStrictEqual(new Array(10).fill(17));
    expect(before).toStrictEqual([0, 1]); // the second block was written over the first one's returns
    port2.postMessage({ type: 'stop' });
    port2.close();
  });
});
