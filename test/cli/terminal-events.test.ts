import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { MIGRATIONS } from '../../src/store/migrations.js';
import { ENVS, reckon, tempFiles } from './run-cli.js';

/**
 * `terminal=X` and length events: counted from where each episode ended, identical across
 * rollout paths, workers, resume and merge, and checked against absorption probabilities
 * worked out by hand (first-step analysis of an absorbing Markov chain: Grinstead & Snell,
 * Introduction to Probability, 1997, §11.2, B = NR; the theorem number 11.6 from memory).
 */
function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

// A forklift of our own in an aisle: 'go' reaches the dock (0.8) or hits a rack (0.2, crashed);
// from the dock 'go' parks it (0.9) or sends it back to the aisle (0.1). 'wait' stays put.
// With a = P(crashed | aisle), d = P(crashed | dock): a = 0.2 + 0.8·d and d = 0.1·a, so
// a = 0.2/0.92 = 5/23, whatever the policy's share of waiting in the aisle (waiting moves no mass).
const P_CRASHED = 5 / 23;
// Waiting half the time in the aisle, the episode is still running after two steps with
// probability 0.25 (wait, wait) + 0.2 (wait, go to the dock) + 0.04 (go to the dock, back) = 0.49.
const P_LENGTH_AT_LEAST_3 = 0.49;
const files = {
  'aisle.json': {
    kind: 'tabular',
    discount: 0.9,
    horizon: 1000,
    states: ['aisle', 'dock', 'crashed', 'parked'],
    actions: ['go', 'wait'],
    start: { aisle: 1 },
    terminal: ['crashed', 'parked'],
    transitions: [
      { from: 'aisle', action: 'go', to: 'dock', p: 0.8, reward: 0 },
      { from: 'aisle', action: 'go', to: 'crashed', p: 0.2, reward: -5 },
      { from: 'aisle', action: 'wait', to: 'aisle', p: 1, reward: 0 },
      { from: 'dock', action: 'go', to: 'parked', p: 0.9, reward: 1 },
      { from: 'dock', action: 'go', to: 'aisle', p: 0.1, reward: 0 },
      { from: 'dock', action: 'wait', to: 'dock', p: 1, reward: 0 },
    ],
  },
  'half-wait.json': { kind: 'table', states: { aisle: { go: 0.5, wait: 0.5 }, dock: 'go' } },
  // The same policy as code, so episodes take the rollout path that calls a policy.
  'half-wait.js': 'export default () => ({ act(state, rng) { return state === "aisle" && rng.uniform() >= 0.5 ? 1 : 0; } });\n',
  'half-wait-code.json': { kind: 'module', path: './half-wait.js' },
  'straight.json': { kind: 'table', states: { aisle: 'go', dock: 'go' } },
};
// Going straight, the episode runs past two steps only by aisle → dock → aisle: 0.8·0.1 = 0.08.
const P_STRAIGHT_LENGTH_AT_LEAST_3 = 0.08;

describe('terminal and length events', () => {
  const dir = tempFiles(files);
  const env = ['--env', path.join(dir, 'aisle.json')];
  const table = [...env, '--policy', path.join(dir, 'half-wait.json')];
  const code = [...env, '--policy', path.join(dir, 'half-wait-code.json')];
  const events = ['--risk', '--event', 'terminal=crashed', '--event', 'terminal=parked', '--event', 'return<0', '--event', 'length>=3'];

  it('exact --risk gives the absorption probabilities worked out by hand', () => {
    const exact = json(reckon(['exact', ...table, ...events, '--json']));
    expect(exact.risk.events[0].probability).toBeCloseTo(P_CRASHED, 12);
    expect(exact.risk.events[1].probability).toBeCloseTo(1 - P_CRASHED, 12);
    expect(exact.risk.events[3].probability).toBeCloseTo(P_LENGTH_AT_LEAST_3, 12);
  });

  it('every rollout path counts the same terminals on 1 and 2 workers, and the counts agree with the returns', () => {
    for (const [policy, noise] of [[table, 'step'], [table, 'visit'], [code, 'step'], [code, 'visit']] as const) {
      const run = (workers: string) => json(reckon(['estimate', ...policy, '--episodes', '6000', '--seed', '4', '--noise', noise, '--workers', workers, ...events, '--json', '--no-store']));
      const one = run('1');
      const two = run('2');
      expect(two.risk, `${policy.at(-1)} ${noise}`).toStrictEqual(one.risk);
      const [crashed, parked, negative] = one.risk.events;
      // A crash pays −5 and nothing after it; a parked forklift was paid +1: the return's sign tells the terminal.
      expect(crashed.count).toBe(negative.count);
      expect(crashed.count + parked.count).toBe(6000);
      expect(crashed.clopper_pearson.low).toBeLessThanOrEqual(P_CRASHED);
      expect(crashed.clopper_pearson.high).toBeGreaterThanOrEqual(P_CRASHED);
    }
  }, 120_000);

  it('the same policy as a table and as code ends the same episodes in the same terminals', () => {
    // Both draw the aisle's coin from the policy stream as one uniform, so the episodes match one for one.
    const a = json(reckon(['estimate', ...table, '--episodes', '3000', '--seed', '8', ...events, '--json', '--no-store']));
    const b = json(reckon(['estimate', ...code, '--episodes', '3000', '--seed', '8', ...events, '--json', '--no-store']));
    expect(b.risk.events.map((e: { count: number }) => e.count)).toStrictEqual(a.risk.events.map((e: { count: number }) => e.count));
  });

  it('runs show --risk counts terminals again from the store; a resumed run and merged shards match the whole run', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const whole = json(reckon(['estimate', ...table, '--episodes', '9000', '--seed', '12', ...events, '--json', '--store', store]));
    expect(json(reckon(['runs', 'show', whole.run_id, ...events, '--json', '--store', store])).risk).toStrictEqual(whole.risk);

    // Cut a copy of the run back to its first chunks, as a killed process leaves it, and resume it.
    const cut = json(reckon(['estimate', ...table, '--episodes', '9000', '--seed', '12', '--json', '--store', store]));
    const db = new Database(store);
    const chunks = db.prepare('SELECT first, count FROM episode_chunks WHERE run_id = ? ORDER BY first').all(cut.run_id) as { first: number; count: number }[];
    expect(chunks.length).toBeGreaterThan(1);
    const keep = chunks[Math.floor(chunks.length / 2)].first;
    db.prepare('DELETE FROM episode_chunks WHERE run_id = ? AND first >= ?').run(cut.run_id, keep);
    db.prepare("UPDATE runs SET status = 'interrupted', episodes_done = ?, finished_at = NULL WHERE id = ?").run(keep, cut.run_id);
    db.close();
    json(reckon(['runs', 'resume', cut.run_id, '--json', '--store', store]));
    expect(json(reckon(['runs', 'show', cut.run_id, ...events, '--json', '--store', store])).risk).toStrictEqual(whole.risk);

    const shards = tempFiles({});
    for (const k of [1, 2]) json(reckon(['estimate', ...table, '--episodes', '9000', '--seed', '12', '--shard', `${k}/2`, '--json', '--store', path.join(shards, `s${k}.sqlite`)]));
    const merged = json(reckon(['runs', 'merge', path.join(shards, 's1.sqlite'), path.join(shards, 's2.sqlite'), '--into', path.join(shards, 'all.sqlite'), '--json']));
    expect(json(reckon(['runs', 'show', merged.run_id, ...events, '--json', '--store', path.join(shards, 'all.sqlite')])).risk).toStrictEqual(whole.risk);
  }, 120_000);

  it('--target-event stops on a terminal or a length event, covers the value worked out by hand, and runs show replays it', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    for (const [event, exact] of [['terminal=crashed', P_CRASHED], ['length>=3', P_LENGTH_AT_LEAST_3]] as const) {
      const out = json(reckon(['estimate', ...table, '--target-event', event, '--target-error', '0.02', '--seed', '3', '--json', '--store', store]));
      expect(out.target_reached, event).toBe(true);
      expect(out.target_event).toMatchObject({ event, method: 'betting', anytime_valid: true });
      expect(out.target_event.half_width).toBeLessThanOrEqual(0.02);
      expect(out.target_event.low).toBeLessThanOrEqual(exact);
      expect(out.target_event.high).toBeGreaterThanOrEqual(exact);
      const shown = json(reckon(['runs', 'show', out.run_id, '--json', '--store', store]));
      expect(shown.target_event).toStrictEqual(out.target_event);
      expect(shown.episodes).toBe(out.episodes);
      // On 2 workers the run stops at the same episode.
      const two = json(reckon(['estimate', ...table, '--target-event', event, '--target-error', '0.02', '--seed', '3', '--workers', '2', '--json', '--no-store']));
      expect(two.target_event).toStrictEqual(out.target_event);
    }
  }, 120_000);

  it('compare --risk pairs terminal and length events on the same episodes; runs show pairs them again from the store', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const args = ['compare', ...env, '--policy', path.join(dir, 'half-wait.json'), '--policy', path.join(dir, 'straight.json'), '--episodes', '6000', '--seed', '5', '--risk', '--event', 'terminal=crashed', '--event', 'length>=3'];
    const out = json(reckon([...args, '--json', '--store', store]));
    const [crashed, long] = out.differences[0].risk.events;
    expect(crashed.event).toBe('terminal=crashed');
    // Waiting moves no mass: both policies crash with probability 5/23, so the difference is 0.
    expect(crashed.low).toBeLessThanOrEqual(0);
    expect(crashed.high).toBeGreaterThanOrEqual(0);
    const difference = P_LENGTH_AT_LEAST_3 - P_STRAIGHT_LENGTH_AT_LEAST_3;
    expect(long.low).toBeLessThanOrEqual(difference);
    expect(long.high).toBeGreaterThanOrEqual(difference);
    const shown = json(reckon(['runs', 'show', out.run_id, '--risk', '--event', 'terminal=crashed', '--event', 'length>=3', '--json', '--store', store]));
    expect(shown.differences[0].risk).toStrictEqual(out.differences[0].risk);
    const text = reckon([...args, '--no-store']);
    expect(text.stdout).toMatch(/P\(terminal=crashed\)/);
  });

  it('a gridworld terminal is named by its cell letter; a module environment refuses terminal events', () => {
    const lane = ['--env', path.join(ENVS, 'loading-lane.json'), '--policy', path.join(ENVS, 'lane-explorer.json')];
    const out = json(reckon(['estimate', ...lane, '--episodes', '2000', '--seed', '1', '--risk', '--event', 'terminal=X', '--event', 'terminal=2,4', '--json', '--no-store']));
    expect(out.risk.events[0].count).toBe(out.risk.events[1].count); // X is the one cell at row 2, column 4
    const text = reckon(['estimate', ...lane, '--episodes', '2000', '--seed', '1', '--risk', '--event', 'terminal=X', '--no-store']);
    expect(text.stdout).toContain('P(terminal=X)');
    const module = reckon(['estimate', '--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(ENVS, 'restock-base-stock.json'), '--episodes', '100', '--risk', '--event', 'terminal=X', '--no-store']);
    expect(module.code).toBe(2);
    expect(module.stderr).toMatch(/^reckon: --event: "terminal=X": terminal events need a finite environment \(gridworld or tabular\)/);
  });

  it('a store at the schema before final states were recorded migrates; its runs keep their return events and say why terminal events are missing', () => {
    const store = path.join(tempFiles({}), 'runs.sqlite');
    const before = MIGRATIONS.findIndex((m) => m.includes('ADD COLUMN finals'));
    expect(before).toBeGreaterThan(0);
    const db = new Database(store);
    db.exec(`CREATE TABLE reckon_schema (version INTEGER NOT NULL); INSERT INTO reckon_schema VALUES (${before});`);
    for (let v = 0; v < before; v++) db.exec(MIGRATIONS[v]);
    // A finished run of a finite environment as the previous schema stored it: no final states.
    db.prepare(`INSERT INTO runs (id, kind, status, created_at, env_label, env_json, env_hash, env_base_dir, policy_label, policy_json,
      policy_hash, policy_base_dir, seed, start_state, first_episode, episodes_requested, options_json, facts_json, tool_version,
      machine_json, episodes_done, steps, seconds) VALUES ('oldrun44', 'estimate', 'done', '2026-01-01T00:00:00.000Z', 'e.json', '{}', 'ab', '/',
      'p.json', '{}', 'cd', '/', 6, NULL, 0, 4, ?, ?, '0.0.1', '{}', 4, 4, 1)`).run(
      JSON.stringify({ episodes: 4, method: 't', level: 0.95, bounds: null, targetError: null, workers: 1 }),
      JSON.stringify({ kind: 'finite', discount: 1, horizon: 10, horizonDerived: false, actions: ['a'], states: 2, rewardRange: [-5, 1], returnBounds: null, truncationBound: null }),
    );
    db.prepare('INSERT INTO episode_chunks VALUES (?, 0, 4, ?, ?)').run('oldrun44', Buffer.from(new Float64Array([1, -5, 1, 1]).buffer), Buffer.from(new Uint32Array([1, 1, 2, 1]).buffer));
    db.close();
    const shown = reckon(['runs', 'show', 'oldrun44', '--risk', '--event', 'terminal=crashed', '--store', store]);
    expect(shown.code).toBe(2);
    expect(shown.stderr).toMatch(/^reckon: --event: "terminal=crashed": this run was stored before reckon recorded where episodes end/);
    const returns = json(reckon(['runs', 'show', 'oldrun44', '--risk', '--event', 'return<0', '--json', '--store', store]));
    expect(returns.risk.events[0].count).toBe(1);
    const after = new Database(store, { readonly: true });
    expect((after.prepare('SELECT version FROM reckon_schema').get() as { version: number }).version).toBe(MIGRATIONS.length);
    after.close();
    // New runs in the migrated store record where their episodes end.
    const fresh = json(reckon(['estimate', ...table, '--episodes', '500', '--seed', '2', '--json', '--store', store]));
    expect(json(reckon(['runs', 'show', fresh.run_id, '--risk', '--event', 'terminal=crashed', '--json', '--store', store])).risk.events[0].episodes).toBe(500);
  });
});
