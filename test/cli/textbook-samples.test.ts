import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { FIXTURES, reckon } from './run-cli.js';

/** The command line's JSON keys and figures on the textbook samples (test/fixtures/textbook-samples). */
const C = path.join(FIXTURES, 'textbook-samples');

describe('command line on the textbook samples', () => {
  // Sutton & Barto 2018, Example 3.5, Figure 3.2 prints 8.8 for this state; 8.7893 is the exact solve
  // of scripts/methods/textbook_grids.py (a numpy linear solve written from the book's description).
  it('exact --json prints value 8.7893 for state "0,1" of the 5×5 portal grid (the book prints 8.8)', () => {
    const out = reckon(['exact', '--env', path.join(C, 'grid-5x5-portals.json'), '--policy', path.join(C, 'uniform.json'), '--start', '0,1', '--json']);
    expect(out.code).toBe(0);
    const json = JSON.parse(out.stdout);
    expect(Math.abs(json.value - 8.7893)).toBeLessThan(1e-4);
    for (const key of ['value', 'std', 'states', 'value_infinite']) expect(json).toHaveProperty(key);
    expect(Object.keys(json.states)).toHaveLength(25);
  });

  it('estimate --json has the listed keys and an interval around the AIMA value 0.705 of state "2,0"', () => {
    const out = reckon([
      'estimate', '--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json'),
      '--start', '2,0', '--episodes', '2000', '--seed', '1', '--no-store', '--json',
    ]);
    expect(out.code).toBe(0);
    const json = JSON.parse(out.stdout);
    for (const key of ['episodes', 'mean', 'std', 'stderr', 'ci', 'projection', 'seed', 'horizon', 'truncation_bound', 'mean_length', 'steps_per_second']) {
      expect(json).toHaveProperty(key);
    }
    for (const key of ['method', 'level', 'low', 'high']) expect(json.ci).toHaveProperty(key);
    for (const key of ['half_width', 'episodes_needed', 'more_episodes', 'seconds']) expect(json.projection[0]).toHaveProperty(key);
    expect(json.episodes).toBe(2000);
    expect(json.ci.low).toBeLessThan(json.mean);
    expect(json.mean).toBeLessThan(json.ci.high);
    // Russell & Norvig, AIMA 3rd ed., Fig. 17.3 (from memory): U(1,1) = 0.705 (exact solve 0.7053,
    // scripts/methods/textbook_grids.py).
    expect(json.ci.low - 0.001).toBeLessThan(0.705);
    expect(json.ci.high + 0.001).toBeGreaterThan(0.705);
  });

  it('the projection table covers the current half-width /2, /5 and /10 by the t rule (docs/methods.md §5)', () => {
    const out = reckon([
      'estimate', '--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json'),
      '--episodes', '1000', '--seed', '2', '--json',
    ]);
    const json = JSON.parse(out.stdout);
    expect(json.projection.map((row: { half_width: number }) => row.half_width / json.ci.half_width)).toEqual([0.5, 0.2, 0.1].map((f) => expect.closeTo(f, 12)));
    // t projection ≈ (1.96·s/ε)² once n is large (common practice).
    for (const row of json.projection) {
      const expected = (1.96 * json.std / row.half_width) ** 2;
      expect(Math.abs(row.episodes_needed - expected) / expected).toBeLessThan(0.01);
    }
  });

  it('--target-error that cannot be reached within the cap says so and reports what it reached', () => {
    const out = reckon([
      'estimate', '--env', path.join(C, 'grid-4x3-slip.json'), '--policy', path.join(C, 'grid-4x3-policy.json'),
      '--episodes', '1000', '--seed', '2', '--target-error', '0.005', '--json',
    ]);
    expect(out.code).toBe(0);
    const json = JSON.parse(out.stdout);
    expect(json.episodes).toBe(1000);
    expect(json.target_reached).toBe(false);
    expect(json.ci.anytime_valid).toBe(true);
    expect(json.projection[0].half_width).toBe(0.005);
    expect(json.projection[0].episodes_needed).toBeGreaterThan(1000);
    expect(out.stderr).toContain('was not reached');
  });

  it('--help works on every command and exits 0', () => {
    for (const command of ['estimate', 'exact', 'check', 'demo', 'compare', 'plan', 'runs']) {
      const out = reckon([command, '--help']);
      expect(out.code).toBe(0);
      expect(out.stdout).toContain(`reckon ${command}`);
    }
    expect(reckon(['--help']).code).toBe(0);
  });
});
