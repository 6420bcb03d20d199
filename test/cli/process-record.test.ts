import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { ENVS, reckon, tempFiles } from './run-cli.js';

/**
 * `estimate --record` on the Python warehouse of envs/python/, on both ways to act: the log
 * holds the run's own episodes with the behaviour policy's probabilities (a policy of the
 * program gives them by its probabilities(observation), reckon's policy by its own), and
 * `reckon offpolicy` on that log estimates a target policy's value. The reference is
 * `reckon exact` on envs/warehouse.json, the same warehouse as a gridworld (dynamic
 * programming, independent of any sampling).
 */
const PYTHON_ENVS = path.join(ENVS, 'python');
const warehouse = path.join(PYTHON_ENVS, 'warehouse.json');
const dir = tempFiles({
  'careful-eps.json': { kind: 'epsilon', epsilon: 0.1, base: { path: path.join(ENVS, 'picker-careful.json') } },
});

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

const exactValue = (policy: string) => json(reckon(['exact', '--env', path.join(ENVS, 'warehouse.json'), '--policy', path.join(ENVS, policy), '--json'])).value as number;

function offpolicy(log: string, target: string) {
  const out = json(reckon(['offpolicy', '--log', log, '--policy', path.join(ENVS, target), '--env', path.join(ENVS, 'warehouse.json'), '--no-store', '--json']));
  return (name: string) => out.estimates.find((e: { name: string }) => e.name === name);
}

/** Every step line of a log: its behaviour_prob is the probability its behaviour_probs give the logged action. */
function checkLines(log: string): number {
  const lines = readFileSync(log, 'utf8').trim().split('\n').map((l) => JSON.parse(l));
  expect(lines[0].kind).toBe('header');
  const actions: string[] = lines[0].actions;
  expect(actions).toStrictEqual(['up', 'down', 'left', 'right']);
  const steps = lines.slice(1);
  for (const step of steps) {
    expect(step.behaviour_prob).toBe(step.behaviour_probs[actions.indexOf(step.action)]);
    expect(step.behaviour_prob).toBeGreaterThan(0);
  }
  return steps.length;
}

describe('estimate --record on a process environment', () => {
  it('a policy of the program (episode path): the log is the run, and importance sampling on it covers the exact value', () => {
    const log = path.join(dir, 'direct-eps.jsonl');
    const run = json(reckon(['estimate', '--env', warehouse, '--policy', path.join(PYTHON_ENVS, 'direct-eps.json'), '--episodes', '600', '--seed', '2', '--no-store', '--json', '--record', log]));
    expect(checkLines(log)).toBe(run.steps);
    // The behaviour policy as the target: every weight is 1, so IS gives the run's own mean.
    const is = offpolicy(log, 'picker-direct-eps.json')('is');
    expect(is.estimate).toBeCloseTo(run.mean, 10);
    const exact = exactValue('picker-direct-eps.json');
    expect(is.intervals.t.low).toBeLessThan(exact);
    expect(is.intervals.t.high).toBeGreaterThan(exact);
  });

  it("reckon's policy (step path): off-policy estimates of the careful route from an ε-careful log cover its exact value", () => {
    const log = path.join(dir, 'careful-eps.jsonl');
    const run = json(reckon(['estimate', '--env', warehouse, '--policy', path.join(dir, 'careful-eps.json'), '--episodes', '600', '--seed', '3', '--no-store', '--json', '--record', log]));
    expect(checkLines(log)).toBe(run.steps);
    const wis = offpolicy(log, 'picker-careful.json')('wis');
    const exact = exactValue('picker-careful.json');
    expect(wis.intervals.bootstrap.low).toBeLessThan(exact);
    expect(wis.intervals.bootstrap.high).toBeGreaterThan(exact);
  });
});
