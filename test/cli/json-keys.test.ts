import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { buildApp } from '../../src/server/app.js';
import { ENVS, FIXTURES, reckon, tempFiles } from './run-cli.js';

/**
 * Every JSON object reckon writes spells its keys in snake_case (lower case, digits and
 * underscores). The only exceptions are the camelCase aliases kept beside their snake_case
 * twins where they were first emitted (a stored run's summary interval), and maps keyed by
 * the user's own names (a run's labels) or by
 * state names.
 */
const KEYED_BY_NAME = new Set(['states', 'states_infinite', 'start', 'labels']);

function badKeys(value: unknown, where = '$'): string[] {
  if (Array.isArray(value)) return value.flatMap((v, i) => badKeys(v, `${where}[${i}]`));
  if (value === null || typeof value !== 'object') return [];
  const bad: string[] = [];
  const object = value as Record<string, unknown>;
  for (const [key, item] of Object.entries(object)) {
    const snake = key.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
    const isAlias = snake !== key && snake in object && object[snake] === item;
    if (!/^[a-z][a-z0-9_]*$/.test(key) && !isAlias) bad.push(`${where}.${key}`);
    if (!KEYED_BY_NAME.has(key)) bad.push(...badKeys(item, `${where}.${key}`));
  }
  return bad;
}

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('JSON keys', () => {
  const C = path.join(FIXTURES, 'textbook-samples');
  const grid = ['--env', path.join(C, 'grid-4x3-slip.json')];
  const policy = path.join(C, 'grid-4x3-policy.json');
  const uniform = path.join(ENVS, 'textbook', 'uniform.json');
  const store = path.join(tempFiles({}), 'runs.sqlite');

  it('are snake_case in every command\'s --json and in the API', async () => {
    const estimate = json(reckon(['estimate', ...grid, '--policy', policy, '--episodes', '400', '--seed', '1', '--store', store, '--json']));
    const sequential = json(reckon(['estimate', ...grid, '--policy', policy, '--target-error', '0.2', '--seed', '1', '--store', store, '--json']));
    const compare = json(reckon(['compare', ...grid, '--policy', policy, '--policy', uniform, '--episodes', '400', '--seed', '1', '--store', store, '--json']));
    const outputs: Record<string, unknown> = {
      estimate,
      sequential,
      compare,
      exact: json(reckon(['exact', ...grid, '--policy', policy, '--json'])),
      check: json(reckon(['check', ...grid, '--policy', policy, '--json'])),
      plan: json(reckon(['plan', ...grid, '--policy', policy, '--target-error', '0.05', '--pilot', '200', '--seed', '1', '--json'])),
      plan_difference: json(reckon(['plan', ...grid, '--policy', policy, '--policy', uniform, '--difference', '0.5', '--pilot', '200', '--seed', '1', '--json'])),
      compare_groups: json(reckon(['compare', ...grid, '--group', `g=${policy},${uniform}`, '--policy', policy, '--episodes', '200', '--seed', '1', '--no-store', '--json'])),
      plan_groups: json(reckon(['plan', ...grid, '--group', `g=${policy},${uniform}`, '--seed-cost', '1h', '--target-error', '0.5', '--pilot', '200', '--seed', '1', '--json'])),
      list: json(reckon(['runs', 'list', '--store', store, '--all', '--json'])),
      show: json(reckon(['runs', 'show', estimate.run_id, '--store', store, '--json'])),
      show_comparison: json(reckon(['runs', 'show', compare.run_id, '--store', store, '--json'])),
    };
    const app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    try {
      outputs.api_runs = (await app.inject({ url: '/api/runs' })).json();
      outputs.api_run = (await app.inject({ url: `/api/runs/${sequential.run_id}` })).json();
      outputs.api_comparison = (await app.inject({ url: `/api/comparisons/${compare.run_id}` })).json();
    } finally {
      await app.close();
    }
    for (const [name, output] of Object.entries(outputs)) expect(badKeys(output), name).toEqual([]);
    // The listing's interval keys, as estimate --json spells them (and the old spelling beside).
    const listed = (outputs.list as { id: string; summary: { ci: Record<string, unknown> } }[]).find((r) => r.id === sequential.run_id)!;
    expect(listed.summary.ci.half_width).toBe(sequential.ci.half_width);
    expect(listed.summary.ci.anytime_valid).toBe(true);
    expect(listed.summary.ci.halfWidth).toBe(sequential.ci.half_width);
  }, 180_000); // a dozen commands, each a process: slow on a loaded machine
});
