/**
 * `reckon offpolicy` and `estimate --record` through the built command line. Check values
 * come from scripts/methods/off_policy.py ("3-episode log"); bad logs must exit 2 with one
 * line naming the file and line (reckon's input-error contract).
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ENVS, FIXTURES, reckon, tempFiles } from './run-cli.js';

const OP = path.join(FIXTURES, 'off-policy');
const HEADER = '{"kind": "header", "discount": 0.9, "reward_bounds": [0, 1], "horizon": 3, "actions": [0, 1]}';

function expectBadLog(lines: string[], text: string | RegExp): void {
  const dir = tempFiles({ 'log.jsonl': `${lines.join('\n')}\n` });
  const result = reckon(['offpolicy', '--log', 'log.jsonl', '--policy', path.join(OP, 'two-state-target.json')], { cwd: dir });
  expect(result.code).toBe(2);
  expect(result.stderr.trim().split('\n')).toHaveLength(1);
  expect(result.stderr).toMatch(text);
}

describe('reckon offpolicy', () => {
  it('--json on the 3-episode log gives the script\'s estimates', () => {
    const result = reckon(['offpolicy', '--log', path.join(OP, 'three-episodes.jsonl'), '--policy', path.join(OP, 'two-state-target.json'), '--resamples', '200', '--json']);
    expect(result.code).toBe(0);
    const json = JSON.parse(result.stdout);
    const byName = Object.fromEntries(json.estimates.map((e: { name: string; estimate: number }) => [e.name, e.estimate]));
    expect(byName.is).toBeCloseTo(4.360147, 6);
    expect(byName.wis).toBeCloseTo(0.614267, 6);
    expect(byName.pdis).toBeCloseTo(3.791822, 6);
    expect(byName.cwpdis).toBeCloseTo(0.857224, 6);
    expect(json.diagnostics.ess).toBeCloseTo(1.251257, 6);
    expect(json.log.episodes).toBe(3);
    expect(json.log.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(Object.keys(json.estimates[0].intervals)).toEqual(['bootstrap', 'bootstrap_percentile', 't']);
  });
  it('bad logs exit 2 with the line', () => {
    const step = (f: object) => JSON.stringify({ episode: 1, t: 0, state: 0, action: 1, reward: 0.2, behaviour_prob: 0.3, end: 'truncated', ...f });
    expectBadLog([HEADER, '{"episode": 1,'], /^reckon: log\.jsonl: line 2: /);
    expectBadLog([HEADER, step({ behaviour_prob: 0 })], 'reckon: log.jsonl: line 2: behaviour_prob must be in (0, 1] (got 0)');
    expectBadLog([HEADER, step({ behaviour_prob: 1.2 })], 'reckon: log.jsonl: line 2: behaviour_prob must be in (0, 1] (got 1.2)');
    expectBadLog([HEADER, step({ end: null }), step({ t: 1 }), step({ t: 1 })], 'reckon: log.jsonl: line 4: duplicate step');
    expectBadLog([HEADER, step({ reward: 2 })], "reckon: log.jsonl: line 2: reward 2 is outside the header's reward_bounds [0, 1]");
    expectBadLog([HEADER, step({ state: 'attic' })], /^reckon: log\.jsonl: line 2: state "attic" is not known to the target policy/);
  });
  it('a target that acts where the behaviour never could is refused', () => {
    const dir = tempFiles({
      'log.jsonl': [HEADER, JSON.stringify({ episode: 1, t: 0, state: 0, action: 1, reward: 0.2, behaviour_prob: 1, behaviour_probs: [0, 1], end: 'truncated' })].join('\n'),
    });
    const result = reckon(['offpolicy', '--log', 'log.jsonl', '--policy', path.join(OP, 'two-state-target.json')], { cwd: dir });
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/^reckon: log\.jsonl: line 2: the target takes action "0" in state "0" .* but the behaviour never could/);
  });
  it('bad options exit 2', () => {
    const r = reckon(['offpolicy', '--log', path.join(OP, 'three-episodes.jsonl'), '--policy', path.join(OP, 'two-state-target.json'), '--estimator', 'is,magic']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^reckon: --estimator: must be one or more of is, wis/);
  });
});

describe('estimate --record', () => {
  it('writes the episodes the run ran: their mean return is the run\'s mean, and offpolicy reads them back', () => {
    const dir = tempFiles({});
    const run = reckon(['estimate', '--env', path.join(ENVS, 'warehouse.json'), '--policy', path.join(ENVS, 'picker-direct-eps.json'), '--episodes', '300', '--seed', '5', '--no-store', '--record', 'log.jsonl', '--json'], { cwd: dir });
    expect(run.code).toBe(0);
    const mean = JSON.parse(run.stdout).mean;
    const lines = readFileSync(path.join(dir, 'log.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    expect(lines[0].kind).toBe('header');
    const returns = new Map<number, number>();
    for (const step of lines.slice(1)) returns.set(step.episode, (returns.get(step.episode) ?? 0) + step.reward * 0.97 ** step.t);
    expect(returns.size).toBe(300);
    expect([...returns.values()].reduce((a, b) => a + b, 0) / 300).toBeCloseTo(mean, 9);
    // evaluating the behaviour itself from its own log: every weight is 1, IS is the plain mean
    const self = reckon(['offpolicy', '--log', 'log.jsonl', '--policy', path.join(ENVS, 'picker-direct-eps.json'), '--env', path.join(ENVS, 'warehouse.json'), '--estimator', 'is,wis', '--resamples', '200', '--json'], { cwd: dir });
    expect(self.code).toBe(0);
    const json = JSON.parse(self.stdout);
    expect(json.estimates[0].estimate).toBeCloseTo(mean, 9);
    expect(json.diagnostics.ess).toBeCloseTo(300, 9);
  });
  it('records a code environment too: the log holds the run\'s episodes, and the behaviour evaluated on its own log gives the run\'s mean', () => {
    const dir = tempFiles({});
    const restock = ['--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(ENVS, 'restock-fixed.json'), '--episodes', '200', '--seed', '5', '--no-store', '--json'];
    const run = reckon(['estimate', ...restock, '--record', 'log.jsonl', '--workers', '2'], { cwd: dir });
    expect(run.code, run.stderr).toBe(0);
    const mean = JSON.parse(run.stdout).mean;
    const lines = readFileSync(path.join(dir, 'log.jsonl'), 'utf8').trim().split('\n').map((l) => JSON.parse(l));
    expect(lines[0]).toMatchObject({ kind: 'header', horizon: 60 });
    const discount = lines[0].discount;
    const returns = new Map<number, number>();
    for (const step of lines.slice(1)) returns.set(step.episode, (returns.get(step.episode) ?? 0) + step.reward * discount ** step.t);
    expect(returns.size).toBe(200);
    expect([...returns.values()].reduce((a, b) => a + b, 0) / 200).toBeCloseTo(mean, 9);
    const self = reckon(['offpolicy', '--log', 'log.jsonl', '--policy', path.join(ENVS, 'restock-fixed.json'), '--estimator', 'is', '--resamples', '200', '--json', '--no-store'], { cwd: dir });
    expect(self.code, self.stderr).toBe(0);
    expect(JSON.parse(self.stdout).estimates[0].estimate).toBeCloseTo(mean, 9);
  });
  it('a log recorded on a code environment recovers another policy\'s exact value (from the environment\'s tabular twin)', () => {
    // A forklift of our own, written twice: as code and as a tabular MDP with the same law.
    // 'go' from the aisle reaches the dock (0.8) or crashes (0.2, −5); from the dock it parks (0.9, +1) or goes back (0.1).
    const dir = tempFiles({
      'aisle.js': `export default () => ({
  actions: ['go', 'wait'], discount: 0.9, horizon: 50, rewardBounds: [-5, 1],
  reset: () => 'aisle',
  step(state, action, rng, out) {
    const u = rng.uniform();
    out.reward = 0; out.done = false; out.state = state;
    if (action === 1) return out;
    if (state === 'aisle') { if (u < 0.8) out.state = 'dock'; else { out.state = 'crashed'; out.reward = -5; out.done = true; } }
    else if (u < 0.9) { out.state = 'parked'; out.reward = 1; out.done = true; } else out.state = 'aisle';
    return out;
  },
});
`,
      'aisle-code.json': { kind: 'module', path: './aisle.js' },
      'aisle.json': {
        kind: 'tabular', discount: 0.9, horizon: 50, states: ['aisle', 'dock', 'crashed', 'parked'], actions: ['go', 'wait'], start: { aisle: 1 }, terminal: ['crashed', 'parked'],
        transitions: [
          { from: 'aisle', action: 'go', to: 'dock', p: 0.8, reward: 0 }, { from: 'aisle', action: 'go', to: 'crashed', p: 0.2, reward: -5 },
          { from: 'aisle', action: 'wait', to: 'aisle', p: 1, reward: 0 },
          { from: 'dock', action: 'go', to: 'parked', p: 0.9, reward: 1 }, { from: 'dock', action: 'go', to: 'aisle', p: 0.1, reward: 0 },
          { from: 'dock', action: 'wait', to: 'dock', p: 1, reward: 0 },
        ],
      },
      'hesitant.js': "export default () => ({ act: (s, rng) => (s === 'aisle' && rng.uniform() >= 0.6 ? 1 : 0), probabilities: (s) => (s === 'aisle' ? [0.6, 0.4] : [1, 0]) });\n",
      'hesitant.json': { kind: 'module', path: './hesitant.js' },
      'straight.json': { kind: 'table', default: 'go', states: { aisle: 'go', dock: 'go' } },
    });
    const run = reckon(['estimate', '--env', 'aisle-code.json', '--policy', 'hesitant.json', '--episodes', '4000', '--seed', '9', '--no-store', '--record', 'log.jsonl', '--json'], { cwd: dir });
    expect(run.code, run.stderr).toBe(0);
    const exact = JSON.parse(reckon(['exact', '--env', 'aisle.json', '--policy', 'straight.json', '--json'], { cwd: dir }).stdout).value;
    const off = reckon(['offpolicy', '--log', 'log.jsonl', '--policy', 'straight.json', '--estimator', 'is,wis', '--resamples', '500', '--json', '--no-store'], { cwd: dir });
    expect(off.code, off.stderr).toBe(0);
    const json = JSON.parse(off.stdout);
    const [is, wis] = json.estimates;
    for (const [name, ci] of [['is t', is.intervals.t], ['is BCa', is.intervals.bootstrap], ['wis BCa', wis.intervals.bootstrap]]) {
      expect(ci.low, name).toBeLessThanOrEqual(exact);
      expect(ci.high, name).toBeGreaterThanOrEqual(exact);
    }
    expect(json.bounds.find((b: { method: string }) => b.method === 'betting-lower').low).toBeLessThanOrEqual(exact);
  });
  it('refuses a code policy without probabilities before running', () => {
    const dir = tempFiles({ 'blind.js': 'export default () => ({ act: () => 0 });\n', 'blind.json': { kind: 'module', path: './blind.js' } });
    const r = reckon(['estimate', '--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(dir, 'blind.json'), '--episodes', '10', '--no-store', '--record', path.join(dir, 'never.jsonl')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^reckon: --record: needs the behaviour policy's probabilities: .*blind\.json is a code policy without probabilities\(state\)/);
    expect(existsSync(path.join(dir, 'never.jsonl'))).toBe(false);
  });
});
