import { describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { ENVS, reckon } from './run-cli.js';

/** Reports tell sampling and analysis time apart; `seconds` stays their sum. */
const env = path.join(ENVS, 'warehouse.json');
const direct = path.join(ENVS, 'picker-direct.json');
const careful = path.join(ENVS, 'picker-careful.json');
const SPLIT = /time\s+\d+(\.\d+)? s sampling \+ \d+(\.\d+)? s analysis on \d worker/;

function expectSplit(json: { seconds: number; sampling_seconds: number; analysis_seconds: number }) {
  expect(json.sampling_seconds).toBeGreaterThan(0);
  expect(json.analysis_seconds).toBeGreaterThan(0);
  expect(json.seconds).toBeCloseTo(json.sampling_seconds + json.analysis_seconds, 12);
}

describe('sampling and analysis time', () => {
  it('estimate and compare print them apart and their --json carries both', () => {
    const base = ['--env', env, '--episodes', '3000', '--seed', '4', '--no-store'];
    const estimate = reckon(['estimate', ...base, '--policy', direct, '--ci', 'bootstrap', '--json']);
    expect(estimate.code).toBe(0);
    expectSplit(JSON.parse(estimate.stdout));
    expect(reckon(['estimate', ...base, '--policy', direct]).stdout).toMatch(SPLIT);
    const compare = reckon(['compare', ...base, '--policy', direct, '--policy', careful, '--json']);
    expect(compare.code).toBe(0);
    expectSplit(JSON.parse(compare.stdout));
    expect(reckon(['compare', ...base, '--policy', direct, '--policy', careful]).stdout).toMatch(SPLIT);
  });

  it('runs show keeps the stored sampling time and times its own analysis', () => {
    const store = path.join(mkdtempSync(path.join(tmpdir(), 'reckon-timings-')), 'runs.sqlite');
    const made = JSON.parse(reckon(['estimate', '--env', env, '--policy', direct, '--episodes', '3000', '--seed', '4', '--store', store, '--json']).stdout);
    const shown = JSON.parse(reckon(['runs', 'show', made.run_id, '--store', store, '--ci', 'bootstrap', '--json']).stdout);
    expectSplit(shown);
    // The sampling time is the stored one, the same at every reading; only the analysis is timed anew.
    const second = JSON.parse(reckon(['runs', 'show', made.run_id, '--store', store, '--json']).stdout);
    expect(second.sampling_seconds).toBe(shown.sampling_seconds);
    expect(shown.sampling_seconds).toBeGreaterThan(0);
    expect(reckon(['runs', 'show', made.run_id, '--store', store]).stdout).toMatch(SPLIT);
    const pair = JSON.parse(reckon(['compare', '--env', env, '--policy', direct, '--policy', careful, '--episodes', '3000', '--seed', '4', '--store', store, '--json']).stdout);
    const again = JSON.parse(reckon(['runs', 'show', pair.run_id, '--store', store, '--json']).stdout);
    expectSplit(again);
    expect(reckon(['runs', 'show', pair.run_id, '--store', store]).stdout).toMatch(SPLIT);
  });
});
