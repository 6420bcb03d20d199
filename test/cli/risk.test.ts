import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { ENVS, reckon, tempFiles } from './run-cli.js';

/** `--risk`, `--event`, `--target-event` and `exact --risk` through the command line. */
function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('risk on the command line', () => {
  const dir = tempFiles({});
  const lane = ['--env', path.join(ENVS, 'loading-lane.json'), '--policy', path.join(ENVS, 'lane-explorer.json')];
  const store = ['--store', path.join(dir, 'runs.sqlite')];

  it('estimate --risk puts quantiles, the tail mean and events under "risk"; runs show --risk recomputes them', () => {
    const out = json(reckon(['estimate', ...lane, '--episodes', '3000', '--seed', '2', '--risk', '--event', 'return<0', '--event', 'length>=20', '--json', ...store]));
    expect(out.risk.quantiles.map((q: { p: number }) => q.p)).toEqual([0.05, 0.5, 0.95]);
    expect(out.risk.tail_mean.tail).toBe(0.05);
    expect(out.risk.tail_mean.dkw.low).toBeLessThanOrEqual(out.risk.tail_mean.estimate);
    expect(out.risk.events.map((e: { event: string }) => e.event)).toEqual(['return<0', 'length>=20']);
    const exact = json(reckon(['exact', ...lane, '--risk', '--event', 'return<0', '--event', 'length>=20', '--json']));
    out.risk.events.forEach((e: { clopper_pearson: { low: number; high: number } }, k: number) => {
      const p = exact.risk.events[k].probability;
      expect(e.clopper_pearson.low).toBeLessThanOrEqual(p);
      expect(e.clopper_pearson.high).toBeGreaterThanOrEqual(p);
    });
    const terminals = exact.risk.terminal_probabilities.map((t: { cell: string }) => t.cell).sort();
    expect(terminals).toEqual(['G', 'X']);
    const shown = json(reckon(['runs', 'show', out.run_id, '--risk', '--event', 'return<0', '--event', 'length>=20', '--json', ...store]));
    expect(shown.risk).toStrictEqual(out.risk);
  });

  it('bad risk options exit 2 with a line that says what to write', () => {
    for (const [args, message] of [
      [['--event', 'return<<0'], /not an event; write return<X/],
      [['--event', 'terminal=Q'], /--event: "terminal=Q": no terminal cell letter or terminal state is named "Q"; its terminals are 'G' \(0,4\), 'X' \(2,4\)/],
      [['--event', 'terminal='], /--event: "terminal=" names no terminal/],
      [['--event', 'terminal=.'], /no terminal cell letter or terminal state is named "\."/],
      [['--target-event', 'terminal=Q', '--target-error', '0.1'], /--target-event: "terminal=Q": no terminal/],
      [['--tail', '1.5'], /--tail: must be a fraction strictly between 0 and 1/],
      [['--quantiles', '0.5,x'], /--quantiles: each level must be a number/],
      [['--target-event', 'return<0'], /--target-event: needs --target-error/],
    ] as const) {
      const out = reckon(['estimate', ...lane, '--episodes', '100', '--seed', '1', '--no-store', ...args]);
      expect(out.code, args.join(' ')).toBe(2);
      expect(out.stderr).toMatch(message);
    }
  });

  it('--target-event stops when the event probability is known to ±E, covers the exact value here, and runs show gives the same', () => {
    const out = json(reckon(['estimate', ...lane, '--target-event', 'return<0', '--target-error', '0.01', '--seed', '5', '--json', ...store]));
    expect(out.target_reached).toBe(true);
    expect(out.target_event).toMatchObject({ event: 'return<0', method: 'betting', anytime_valid: true });
    expect(out.target_event.half_width).toBeLessThanOrEqual(0.01);
    const exact = json(reckon(['exact', ...lane, '--risk', '--event', 'return<0', '--json']));
    expect(out.target_event.low).toBeLessThanOrEqual(exact.risk.events[0].probability);
    expect(out.target_event.high).toBeGreaterThanOrEqual(exact.risk.events[0].probability);
    const shown = json(reckon(['runs', 'show', out.run_id, '--json', ...store]));
    expect(shown.target_event).toStrictEqual(out.target_event);
    expect(shown.episodes).toBe(out.episodes);
  });

  it('the demo restocking module: the risk report names its worst 5% and bounds a loss it never saw', () => {
    const out = json(reckon(['estimate', '--env', path.join(ENVS, 'restock-env.json'), '--policy', path.join(ENVS, 'restock-base-stock.json'), '--episodes', '3000', '--seed', '3', '--risk', '--event', 'return<0', '--json', '--no-store']));
    expect(out.risk.events[0].count).toBe(0);
    expect(out.risk.events[0].zero_events.upper).toBeCloseTo(1 - Math.pow(0.05, 1 / 3000), 12); // one-sided Clopper–Pearson at x = 0
    expect(out.risk.tail_mean.estimate).toBeLessThan(out.risk.quantiles[0].estimate);
  });
});

describe('compare --risk', () => {
  // A choice of our own between a gamble and a sure thing: 'press' pays 10 with probability 0.9 and
  // −20 otherwise (mean 7), 'hold' pays 5 (mean 5). The gamble's worst 5% is −20.
  const dir = tempFiles({
    'choice.json': {
      kind: 'tabular', discount: 1, horizon: 1, states: ['ready', 'done'], actions: ['press', 'hold'], start: { ready: 1 }, terminal: ['done'],
      transitions: [
        { from: 'ready', action: 'press', to: 'done', p: 0.9, reward: 10 },
        { from: 'ready', action: 'press', to: 'done', p: 0.1, reward: -20 },
        { from: 'ready', action: 'hold', to: 'done', p: 1, reward: 5 },
      ],
    },
    'press.json': { kind: 'table', states: { ready: 'press' } },
    'hold.json': { kind: 'table', states: { ready: 'hold' } },
  });
  it('reports each policy\'s tail and the paired difference, and says when the better mean has the worse tail', () => {
    const out = json(reckon(['compare', '--env', path.join(dir, 'choice.json'), '--policy', path.join(dir, 'press.json'), '--policy', path.join(dir, 'hold.json'), '--episodes', '4000', '--seed', '9', '--risk', '--event', 'return<0', '--json', '--store', path.join(dir, 'runs.sqlite')]));
    expect(out.differences[0].mean).toBeGreaterThan(0); // the gamble wins on average (7 against 5)
    expect(out.policies[0].risk.tail_mean.estimate).toBeCloseTo(-20, 12); // at least 5% of 4000 draws of −20 at p = 0.1
    expect(out.policies[1].risk.tail_mean.estimate).toBe(5);
    const d = out.differences[0].risk;
    expect(d).toMatchObject({ approximate: true, tail: 0.05 });
    expect(d.tail_mean.estimate).toBeCloseTo(-25, 12);
    expect(d.events[0].low).toBeLessThanOrEqual(0.1); // exact P(return<0) difference: 0.1 − 0
    expect(d.events[0].high).toBeGreaterThanOrEqual(0.1);
    expect(out.warnings.join(' ')).toMatch(/\[0\] has the better mean but the worse tail/);
    const shown = json(reckon(['runs', 'show', out.run_id, '--risk', '--event', 'return<0', '--json', '--store', path.join(dir, 'runs.sqlite')]));
    expect(shown.differences[0].risk).toStrictEqual(out.differences[0].risk);
  });
});
