import { describe, expect, it } from 'vitest';
import { copyFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { ENVS, reckon, tempFiles } from './run-cli.js';
import { readDefinitionFile } from '../../src/definitions/index.js';
import { runComparison, type CompareRequest, type ComparisonResult } from '../../src/evaluate/compare.js';
import { analyzeStoredComparison, resumeStoredComparison, runStoredComparison } from '../../src/evaluate/stored-compare.js';
import { compareJson } from '../../src/report/compare-json.js';
import { openStore } from '../../src/store/open.js';
import { getRun, listMembers } from '../../src/store/runs.js';
import { StoppedEarly } from '../../src/errors.js';

/**
 * A comparison interrupted part-way and resumed must give exactly the figures of one never
 * interrupted: every policy's episode i is a pure function of (seed, i), whichever process
 * runs it (common practice of seeded simulation; README, "Reviewing runs"). The reference is
 * the same comparison run straight through. The grid is AIMA's 4×3 world (Russell & Norvig,
 * 3rd ed., fig. 17.1), with the book's optimal policy against the uniform one and a third.
 */
const dir = tempFiles({ 'careful.json': { kind: 'epsilon', epsilon: 0.3, base: { path: 'optimal.json' } } });
copyFileSync(path.join(ENVS, 'textbook', 'grid-4x3-optimal.json'), path.join(dir, 'optimal.json'));
copyFileSync(path.join(ENVS, 'textbook', 'uniform.json'), path.join(dir, 'uniform.json'));
copyFileSync(path.join(ENVS, 'textbook', 'grid-4x3.json'), path.join(dir, 'grid.json'));
const files = ['optimal.json', 'uniform.json', 'careful.json'].map((f) => path.join(dir, f));

function request(overrides: Partial<CompareRequest>): CompareRequest {
  return {
    env: readDefinitionFile(path.join(dir, 'grid.json')),
    policies: files.map((f) => readDefinitionFile(f)),
    seed: 11,
    start: null,
    noise: 'step',
    episodes: 6000,
    workers: 1,
    method: 't',
    sequence: null,
    level: 0.95,
    bounds: null,
    sigma: null,
    targetError: null,
    interquartileMean: true,
    ...overrides,
  };
}

/** Every figure of a comparison's report, without timings and run ids. */
function figures(result: ComparisonResult) {
  const json = compareJson(result, { env: 'grid', policies: files }, 'test');
  return {
    episodes: json.episodes,
    policies: json.policies.map(({ run_id: _, ...rest }) => rest),
    differences: json.differences,
    ranking: json.ranking,
    target_reached: json.target_reached,
    interrupted: json.interrupted,
  };
}

/** Stores the comparison, stopping it (as Ctrl-C would) once `stopWhen` says so; returns the store and run id. */
async function interrupted(overrides: Partial<CompareRequest>, stopWhen: (done: number, total: number) => boolean) {
  const store = path.join(tempFiles({}), 'runs.sqlite');
  const db = openStore(store);
  const stop = new AbortController();
  try {
    const { runId, result } = await runStoredComparison(db, {
      ...request(overrides),
      signal: stop.signal,
      onProgress: (p) => {
        if (stopWhen(p.done, p.total)) stop.abort();
      },
    }, 'test');
    return { store, runId, result };
  } catch (e) {
    // Stopped before two pairs were complete: kept as interrupted all the same.
    if (!(e instanceof StoppedEarly) || e.runId === null) throw e;
    return { store, runId: e.runId, result: null };
  } finally {
    db.close();
  }
}

describe('resuming an interrupted comparison', () => {
  it('continues every member of a fixed-size comparison to the figures of an uninterrupted one, bit for bit', async () => {
    const reference = figures(await runComparison(request({})));
    // The policies run one after another: stopped while the second runs (no pair complete yet,
    // each member keeps what it ran), and while the third runs (some pairs complete).
    // (Progress counts a third of each policy's episodes; blocks grow at most fourfold from 32,
    // so these thresholds fall inside the second and the third policy's run.)
    for (const share of [0.4, 0.7]) {
      const { store, runId, result } = await interrupted({}, (done, total) => done > share * total);
      const db = openStore(store);
      expect(getRun(db, runId, store).status).toBe('interrupted');
      const stored = listMembers(db, runId).map((m) => m.episodesDone);
      const running = share < 0.5 ? 1 : 2;
      expect(stored[0]).toBe(6000);
      expect(stored[running]).toBeGreaterThan(0);
      expect(stored[running]).toBeLessThan(6000);
      if (running === 1) expect(stored[2]).toBe(0);
      else expect(stored[1]).toBe(6000);
      if (running === 2) {
        expect(result!.interrupted).toBe(true);
        expect(result!.episodes).toBe(stored[2]);
        expect(figures(analyzeStoredComparison(db, getRun(db, runId, store)).result).episodes).toBe(stored[2]);
      }
      const resumed = await resumeStoredComparison(db, getRun(db, runId, store), {});
      expect(figures(resumed.result)).toEqual(reference);
      expect(getRun(db, runId, store).status).toBe('done');
      for (const member of listMembers(db, runId)) expect([member.status, member.episodesDone]).toEqual(['done', 6000]);
      expect(figures(analyzeStoredComparison(db, getRun(db, runId, store)).result)).toEqual(reference);
      db.close();
    }
  }, 60_000);

  it('replays a target-error comparison through its sequences and stops at the same episode', async () => {
    const overrides = { targetError: 0.12, episodes: 200_000, interquartileMean: false };
    const reference = figures(await runComparison(request(overrides)));
    expect(reference.target_reached).toBe(true);
    expect(reference.episodes).toBeGreaterThan(2000); // more than the first batch, so the resume has work left
    // Stopped after its first batch of paired episodes.
    const { store, runId, result } = await interrupted(overrides, (done) => done >= 2000);
    expect(result!.episodes).toBe(2000);
    const db = openStore(store);
    const resumed = await resumeStoredComparison(db, getRun(db, runId, store), {});
    expect(figures(resumed.result)).toEqual(reference);
    db.close();
  }, 60_000);

  it('reckon runs resume continues a comparison, refuses its member runs, and refuses after a policy file changed', async () => {
    const reference = figures(await runComparison(request({})));
    const first = await interrupted({}, (done, total) => done > 0.7 * total);
    const db = openStore(first.store);
    const members = listMembers(db, first.runId).map((m) => m.id);
    db.close();
    const member = reckon(['runs', 'resume', members[1], '--store', first.store]);
    expect(member.code).toBe(2);
    expect(member.stderr).toContain(`is one policy's part of comparison ${first.runId}`);
    expect(member.stderr).toContain(`reckon runs resume ${first.runId}`);

    const resumed = reckon(['runs', 'resume', first.runId, '--store', first.store, '--json']);
    expect(resumed.code).toBe(0);
    const json = JSON.parse(resumed.stdout);
    expect(json.run_id).toBe(first.runId);
    expect(json.members ?? json.policies.map((p: { run_id: string }) => p.run_id)).toEqual(members);
    const shown = JSON.parse(reckon(['runs', 'show', first.runId, '--store', first.store, '--json']).stdout);
    expect(shown.status).toBe('done');
    expect(shown.differences).toEqual(reference.differences);
    expect(shown.policies.map((p: { mean: number }) => p.mean)).toEqual(reference.policies.map((p) => p.mean));

    // The base policy named by careful.json changes: the comparison cannot be continued exactly.
    const second = await interrupted({}, (done, total) => done > 0.7 * total);
    writeFileSync(path.join(dir, 'optimal.json'), JSON.stringify({ kind: 'uniform' }));
    const refused = reckon(['runs', 'resume', second.runId, '--store', second.store]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('optimal.json (part of its policy) has changed since the comparison started');
  }, 90_000);
});
