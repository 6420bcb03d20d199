import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { BettingSequence, type BetSchedule } from '../../src/stats/betting-sequence.js';
import { EmpiricalBernsteinSequence } from '../../src/stats/empirical-bernstein-sequence.js';
import { InputError } from '../../src/errors.js';

// Computed by test/fixtures/betting/betting_reference.py: an independent numpy implementation of
// Waudby-Smith & Ramdas (2024), Theorem 3, with exact capitals over the whole history and
// endpoints by bisection to 1e-12.
const reference = JSON.parse(readFileSync(new URL('../fixtures/betting/betting-reference.json', import.meta.url), 'utf8'));
const PHI = 0.6180339887498949;
const seqA = (n: number) => Float64Array.from({ length: n }, (_, k) => ((k + 1) * PHI) % 1);
const seqB = (n: number) => seqA(n).map((x) => (x < 0.1 ? 1 : 0));

// The fixture's cases use the paper's c = 1/2 throughout (targeted ones also c = 3/4, as the product's default for them).
function scheduleOf(c: { schedule: string; value?: number }): BetSchedule {
  if (c.schedule === 'anytime') return { kind: 'anytime' };
  if (c.schedule === 'fixed') return { kind: 'planned', episodes: c.value! };
  return { kind: 'target', halfWidth: c.value! };
}

describe('betting confidence sequence (Waudby-Smith & Ramdas 2024, Theorem 3)', () => {
  it('predictable plug-in bets λ_1..3 and λ_100 on x_i = frac(i·φ) match the paper\'s formula (numpy fixture)', () => {
    const sequence = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    sequence.add(seqA(100));
    const bets = sequence.betHistory();
    reference.seqA_100_bets.first3.forEach((value: number, k: number) => expect(bets[k]).toBeCloseTo(value, 8));
    expect(bets[99]).toBeCloseTo(reference.seqA_100_bets.last, 8);
  });

  it('log-capitals log K±_100(m) at m = 0.40, 0.45, 0.55, 0.60 match the fixture', () => {
    const sequence = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    sequence.add(seqA(100));
    for (const row of reference.seqA_100_log_capital) {
      expect(sequence.logCapital(row.m, 1)).toBeCloseTo(row.plus, 8);
      expect(sequence.logCapital(row.m, -1)).toBeCloseTo(row.minus, 8);
    }
  });

  for (const c of reference.cases.filter((c: { running: boolean }) => c.running)) {
    it(`running interval, ${c.data}, n = ${c.n}, ${c.schedule} bets, c = ${c.c}: the streamed grid contains the exact interval, and the refined one matches it`, () => {
      const data = (c.data === 'seqA' ? seqA : seqB)(c.n);
      const sequence = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: scheduleOf(c), truncation: c.c });
      sequence.add(data);
      const [low, high] = c.interval as [number, number];
      const grid = sequence.interval();
      expect(grid.low).toBeLessThanOrEqual(low + 1e-9);
      expect(grid.high).toBeGreaterThanOrEqual(high - 1e-9);
      // streaming with outward snapping is at most a few per cent wider (grid of 128, rebuilt at half)
      expect(grid.high - grid.low).toBeLessThan((high - low) * 1.1);
      const refined = sequence.refined();
      expect(refined.low).toBeLessThanOrEqual(low + 1e-9);
      expect(refined.high).toBeGreaterThanOrEqual(high - 1e-9);
      expect(refined.high - refined.low).toBeLessThan((high - low) * 1.02);
      expect(refined).toMatchObject({ method: 'betting', anytimeValid: true, episodes: c.n });
    });
  }

  it('maps returns to [0, 1] by the bounds: the interval on [−2, 3] is the unit one rescaled', () => {
    const unit = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    const scaled = new BettingSequence({ level: 0.95, bounds: [-2, 3], schedule: { kind: 'anytime' } });
    const data = seqA(300);
    unit.add(data);
    scaled.add(data.map((x) => -2 + 5 * x));
    expect(scaled.interval().low).toBeCloseTo(-2 + 5 * unit.interval().low, 10);
    expect(scaled.interval().high).toBeCloseTo(-2 + 5 * unit.interval().high, 10);
  });

  it('does not depend on how values are batched', () => {
    const data = seqB(5000);
    const whole = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'target', halfWidth: 0.01 } });
    whole.add(data);
    const pieces = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'target', halfWidth: 0.01 } });
    for (let k = 0; k < data.length; k += 37) pieces.add(data.subarray(k, k + 37));
    expect(pieces.refined()).toEqual(whole.refined());
  });

  it('shrinks on constant data without dividing by zero (the fake observation keeps σ̂² > 0)', () => {
    const sequence = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    sequence.add(new Float64Array(2000).fill(0.3));
    const ci = sequence.refined();
    expect(ci.low).toBeLessThan(0.3);
    expect(ci.high).toBeGreaterThan(0.3);
    expect(ci.high - ci.low).toBeLessThan(0.05);
  });

  it('refuses a return outside its bounds, naming the episode', () => {
    const sequence = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    expect(() => sequence.add([0.5, 1.5])).toThrow(InputError);
  });

  // Waudby-Smith & Ramdas (2024) report the betting sequence tighter than empirical-Bernstein ones
  // at small and moderate n; checked here at n = 100 and 1000, means over 20 seeded paths.
  it('untargeted betting is no wider than the empirical-Bernstein sequence at n = 100 and 1000 (Bernoulli(0.1), Beta(2,5), {0.4, 0.6})', async () => {
    const { makeSampler } = await import('./betting-samplers.js');
    for (const name of ['bernoulli', 'beta', 'two-point'] as const) {
      for (const n of [100, 1000]) {
        let betting = 0;
        let bernstein = 0;
        for (let path = 0; path < 20; path++) {
          const data = makeSampler(name, 1000 + path)(n);
          const bet = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
          bet.add(data);
          const eb = new EmpiricalBernsteinSequence({ level: 0.95, bounds: [0, 1] });
          eb.add(data);
          betting += bet.refined().halfWidth;
          bernstein += eb.interval().halfWidth;
        }
        expect(betting, `${name}, n = ${n}`).toBeLessThanOrEqual(bernstein);
      }
    }
  });
});

describe('report helpers for sequences', () => {
  it('prints mean ± h only for an interval centred on the mean, else mean (low … high)', async () => {
    const { meanWithInterval } = await import('../../src/report/format.js');
    expect(meanWithInterval(1, 0.9, 1.1, 2)).toBe('1.00 ± 0.10');
    // the off-centre example of a 60-state MDP run: 4.221 with interval 4.132 … 4.232
    expect(meanWithInterval(4.221, 4.132, 4.232, 3)).toBe('4.221 (4.132 … 4.232)');
  });

  it('the convergence plot of a sequence run draws the sequence itself, which only narrows', async () => {
    const { sequenceSeries } = await import('../../src/report/plots/convergence.js');
    const data = seqB(5000);
    const series = sequenceSeries(data, new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } }), 40);
    const direct = new BettingSequence({ level: 0.95, bounds: [0, 1], schedule: { kind: 'anytime' } });
    direct.add(data);
    expect(series.at(-1)!.low).toBe(direct.interval().low);
    expect(series.at(-1)!.high).toBe(direct.interval().high);
    for (let k = 1; k < series.length; k++) {
      expect(series[k].low).toBeGreaterThanOrEqual(series[k - 1].low);
      expect(series[k].high).toBeLessThanOrEqual(series[k - 1].high);
    }
  });

  it('warns about bootstrap differences with many ties below 200 pairs, not above', async () => {
    const { differenceWarnings } = await import('../../src/evaluate/interval-advice.js');
    const tied = Float64Array.from({ length: 100 }, (_, i) => (i % 2 === 0 ? 0 : i % 7));
    expect(differenceWarnings('bootstrap', tied).join(' ')).toMatch(/57% of the 100 pairs.*prefer --ci t/);
    expect(differenceWarnings('t', tied)).toEqual([]);
    const many = Float64Array.from({ length: 400 }, (_, i) => (i % 2 === 0 ? 0 : i % 7));
    expect(differenceWarnings('bootstrap', many)).toEqual([]);
  });
});
