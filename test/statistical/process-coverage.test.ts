import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import { readFileSync } from 'node:fs';
import { keepProcessConnections } from '../../src/definitions/process-environment.js';
import type { ModuleEnvironment } from '../../src/definitions/built.js';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout, type PreparedRollout } from '../../src/engine/prepare.js';
import { rolloutProcessEpisodes } from '../../src/engine/process-episodes.js';
import { rolloutProcessSteps } from '../../src/engine/process-steps.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { exactEvaluation } from '../../src/exact/index.js';
import { summarize } from '../../src/stats/index.js';
import { tInterval } from '../../src/stats/t-interval.js';

/**
 * The demo warehouse written in Python (envs/python/warehouse_env.py) against the exact value
 * of the gridworld file it transcribes (envs/warehouse.json), on both ways to act: reckon's
 * table policy stepping the program, and the same route as a policy of the program running
 * whole episodes. The careful route never meets the spill, so its returns depend on the dock
 * alone; the noisy direct route crosses the spill, slips into the lane and bumps into shelves,
 * so it exercises every rule of the model.
 */
const ENVS = path.resolve(__dirname, '../../envs');
const source = (file: string) => ({ label: path.relative(process.cwd(), file), baseDir: path.dirname(file), file });
const read = (file: string) => JSON.parse(readFileSync(file, 'utf8'));

const gridFile = path.join(ENVS, 'warehouse.json');
const pythonFile = path.join(ENVS, 'python', 'warehouse.json');
const carefulTable = path.join(ENVS, 'picker-careful.json');

function spec(envFile: string, policy: unknown, policyBase: string): RolloutSpec {
  return {
    env: { json: read(envFile), source: source(envFile) },
    policy: { json: policy, source: { label: 'policy', baseDir: policyBase } },
    seed: 0,
    start: null,
    noise: 'step',
  };
}

/** The arrows picture of a gridworld policy as the table of states it means ("row,col": action). */
function arrowsAsTable(file: string): unknown {
  const symbols: Record<string, string> = { '^': 'up', v: 'down', '<': 'left', '>': 'right' };
  const states: Record<string, string> = {};
  (read(file).rows as string[]).forEach((row, r) => [...row].forEach((ch, c) => symbols[ch] && (states[`${r},${c}`] = symbols[ch])));
  return { kind: 'table', default: 'uniform', states };
}

const cases = [
  { name: 'careful route', exactPolicy: read(carefulTable), table: read(carefulTable), inProgram: { kind: 'process', name: 'careful' } },
  {
    name: 'direct route with 10% random moves',
    exactPolicy: read(path.join(ENVS, 'picker-direct-eps.json')),
    table: { kind: 'epsilon', epsilon: 0.1, base: arrowsAsTable(path.join(ENVS, 'picker-direct.json')) },
    inProgram: { kind: 'process', name: 'direct', options: { epsilon: 0.1 } },
  },
];

async function exactValue(policy: unknown): Promise<number> {
  const prepared = await prepareRollout(spec(gridFile, policy, ENVS));
  if (prepared.env.kind !== 'finite' || !prepared.policy.matrix) throw new Error('expected a compiled gridworld');
  return exactEvaluation(prepared.env.mdp, prepared.policy.matrix).value;
}

const seeds = 20;
const episodes = 300;
const opened: PreparedRollout[] = [];

beforeAll(() => keepProcessConnections());
afterAll(() => {
  for (const prepared of opened) (prepared.env as ModuleEnvironment).process?.connection?.close();
});

describe('the Python warehouse agrees with reckon exact on the gridworld file', () => {
  for (const { name, exactPolicy, table, inProgram } of cases) {
    it(`${name}: at least 17 of 20 seeds' 95% t intervals cover the exact value, on both paths`, async () => {
      const exact = await exactValue(exactPolicy);
      const stepPath = await prepareRollout(spec(pythonFile, table, ENVS));
      const episodePath = await prepareRollout(spec(pythonFile, inProgram, ENVS));
      opened.push(stepPath, episodePath);
      const env = stepPath.env as ModuleEnvironment;
      const covered = { step: 0, episode: 0 };
      let sameReturns = 0;
      for (let seed = 1; seed <= seeds; seed++) {
        const a = newBlock(0, episodes);
        await rolloutProcessSteps(env, env.process!.connection!, (stepPath.policy as { acting: never }).acting, seed, a, 10);
        const b = newBlock(0, episodes);
        const programEnv = episodePath.env as ModuleEnvironment;
        await rolloutProcessEpisodes(programEnv, programEnv.process!.connection!, inProgram.name, seed, b, 10);
        for (const [path, block] of [['step', a], ['episode', b]] as const) {
          const ci = tInterval(summarize(block.returns), 0.95);
          if (ci.low <= exact && exact <= ci.high) covered[path]++;
        }
        if (a.returns.every((g, i) => g === b.returns[i])) sameReturns++;
      }
      // 95% intervals over 20 seeds: P(at most 16 cover) = 1.6% if coverage is exact (binomial,
      // common practice); a model that differs from the file shifts the mean and fails this.
      expect(covered.step).toBeGreaterThanOrEqual(17);
      expect(covered.episode).toBeGreaterThanOrEqual(17);
      // The careful route draws nothing of its own, so both paths see the same episodes: equal
      // returns, bit for bit, show the helper sums the return in reckon's order.
      if (inProgram.name === 'careful') expect(sameReturns).toBe(seeds);
    }, 60_000);
  }
});
