import { describe, expect, it } from 'vitest';
import { reckon } from './run-cli.js';

describe('reckon demo', () => {
  it('prints both runs, checks them against the exact values, and repeats the safety caution', () => {
    const out = reckon(['demo']);
    expect(out.code).toBe(0);
    expect(out.stdout.match(/inside the interval|OUTSIDE the interval/g)).toHaveLength(2);
    expect(out.stdout.match(/stored as run/g)).toHaveLength(2);
    // The README's caution, where the scenario is physical (a robot beside a forklift lane).
    const caution = out.stdout.match(/statistical estimates about the modelled warehouse[\s\S]*?not a safety case/g);
    expect(caution?.length).toBeGreaterThanOrEqual(1);
    expect(out.stdout).toContain('follow the safety practice and standards that apply to it');
  });
});
