import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { newBlock } from '../../src/engine/episode-block.js';
import type { NoiseMode } from '../../src/engine/noise.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import type { RolloutSpec } from '../../src/engine/spec.js';
import { VisitCounts, VisitPolicyRng } from '../../src/engine/visit-noise.js';
import { runComparison, type CompareRequest } from '../../src/evaluate/compare.js';
import { runEstimate, type EstimateResult } from '../../src/evaluate/estimate.js';
import { resumeStoredEstimate, runStoredEstimate } from '../../src/evaluate/stored-estimate.js';
import { openStore } from '../../src/store/open.js';
import { findRun } from '../../src/store/runs.js';
import { inlineSource as source, smallGrid, towardsGoal } from '../statistical/small-grid.js';

/**
 * Visit-keyed noise keeps the run contract: the result is a pure function of (env, policy,
 * seed, episodes, noise mode), whatever the workers, blocks, interruptions, or whether the
 * policy ran alone (estimate) or beside others (compare). Equality here is that contract
 * itself (same episodes, same figures), so the reference is a plain run of the same spec.
 */
const env = { json: smallGrid, source };
const careful = { json: { kind: 'epsilon', epsilon: 0.2, base: towardsGoal }, source };
const bolder = { json: { kind: 'epsilon', epsilon: 0.3, base: towardsGoal }, source };

function spec(policy: typeof careful, seed: number, noise: NoiseMode): RolloutSpec {
  return { env, policy, seed, start: null, noise };
}

function estimate(s: RolloutSpec, episodes: number, workers = 1): Promise<EstimateResult> {
  return runEstimate({ spec: s, episodes, workers, method: 't', level: 0.95, bounds: null, targetError: null });
}

/** The figures that depend on the episodes only (not on timing or workers). */
function figures(r: EstimateResult) {
  return { episodes: r.episodes, mean: r.mean, std: r.std, min: r.min, max: r.max, ci: r.ci, steps: r.steps, noise: r.noise };
}

describe('visit-keyed noise keeps the run contract', () => {
  it('episode i is the same whether run alone, in a block, or after other episodes', async () => {
    const prepared = await prepareRollout(spec(careful, 7, 'visit'));
    const whole = newBlock(0, 300);
    prepared.runBlock(whole);
    const alone = newBlock(217, 1);
    prepared.runBlock(alone);
    expect(alone.returns[0]).toBe(whole.returns[217]);
    expect(alone.lengths[0]).toBe(whole.lengths[217]);
  });

  it('differs from step-keyed noise and between seeds (the mode and the seed are inputs)', async () => {
    const [visit, step, other] = await Promise.all([
      estimate(spec(careful, 7, 'visit'), 2000),
      estimate(spec(careful, 7, 'step'), 2000),
      estimate(spec(careful, 8, 'visit'), 2000),
    ]);
    expect(visit.mean).not.toBe(step.mean);
    expect(visit.mean).not.toBe(other.mean);
    expect(visit.noise).toBe('visit');
    expect(step.noise).toBe('step');
  });

  it('bit-identical figures with 1 and 2 workers', async () => {
    const one = await estimate(spec(careful, 42, 'visit'), 30_000, 1);
    const two = await estimate(spec(careful, 42, 'visit'), 30_000, 2);
    expect(figures(two)).toStrictEqual(figures(one));
  });

  it('compare gives each policy the figures estimate gives it in the same mode', async () => {
    const request: CompareRequest = {
      env,
      policies: [careful, bolder],
      seed: 5,
      start: null,
      noise: 'visit',
      episodes: 5000,
      workers: 1,
      method: 't',
      sequence: null,
      level: 0.95,
      bounds: null,
      sigma: null,
      targetError: null,
      interquartileMean: false,
    };
    const compared = await runComparison(request);
    const alone = [await estimate(spec(careful, 5, 'visit'), 5000), await estimate(spec(bolder, 5, 'visit'), 5000)];
    for (let p = 0; p < 2; p++) {
      expect(compared.estimates[p].mean).toBe(alone[p].mean);
      expect(compared.estimates[p].std).toBe(alone[p].std);
      expect(compared.estimates[p].ci).toStrictEqual(alone[p].ci);
      expect(compared.estimates[p].noise).toBe('visit');
    }
  });

  it('a run interrupted and resumed from the store ends with the uninterrupted figures, and keeps its mode', async () => {
    const db = openStore(path.join(mkdtempSync(path.join(tmpdir(), 'reckon-visit-')), 'runs.sqlite'));
    try {
      const stop = new AbortController();
      const options = { episodes: 20_000, method: 't' as const, sigma: null, level: 0.95, bounds: null, targetError: null, workers: 1 };
      const first = await runStoredEstimate({
        db,
        spec: spec(bolder, 9, 'visit'),
        options,
        toolVersion: 'test',
        shard: null,
        first: 0,
        signal: stop.signal,
        onProgress: (p) => {
          if (p.done >= 500) stop.abort();
        },
      });
      expect(first.result.interrupted).toBe(true);
      const stored = findRun(db, first.runId)!;
      expect(stored.noise).toBe('visit');
      expect(stored.episodesDone).toBeLessThan(20_000);
      const resumed = await resumeStoredEstimate(db, stored, {});
      const reference = await estimate(spec(bolder, 9, 'visit'), 20_000);
      expect(figures(resumed.result)).toStrictEqual(figures(reference));
    } finally {
      db.close();
    }
  });

  it('a module environment refuses visit noise with a one-line error naming --noise', async () => {
    const moduleEnv = { json: { kind: 'module', path: './never-loaded.js' }, source: { label: 'yard.json', baseDir: '/nonexistent' } };
    await expect(prepareRollout({ env: moduleEnv, policy: { json: { kind: 'uniform' }, source }, seed: 1, start: null, noise: 'visit' })).rejects.toMatchObject({
      name: 'InputError',
      where: '--noise',
      message: expect.stringMatching(/^--noise: visit needs a finite environment .*yard\.json is a module environment; use --noise step$/),
    });
  });
});

describe('visit counts and the code policy generator', () => {
  it('an epoch stamp resets every count, also across the epoch wrap', () => {
    const counts = new VisitCounts(3);
    counts.epoch = 0x7ffffffe;
    const e1 = counts.nextEpisode();
    counts.stamp[1] = e1;
    counts.count[1] = 5;
    const e2 = counts.nextEpisode(); // wraps: stamps cleared
    expect(e2).toBe(1);
    expect(counts.stamp[1]).not.toBe(e2);
  });

  it("a code policy's draws depend on the visit only, four words a block (common practice: counter-based streams)", () => {
    const rng = new VisitPolicyRng();
    rng.key(3, 10);
    rng.at(4, 2);
    const first = Array.from({ length: 6 }, () => rng.uint32());
    rng.at(0, 0);
    rng.uint32();
    rng.at(4, 2);
    expect(Array.from({ length: 6 }, () => rng.uint32())).toEqual(first);
    expect(new Set(first).size).toBe(6);
  });
});
