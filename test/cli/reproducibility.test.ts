import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { FIXTURES, reckon } from './run-cli.js';

/** Drops what depends on the machine's speed or the worker count: everything else must match bit for bit. */
function figures(stdout: string) {
  const json = JSON.parse(stdout);
  delete json.seconds;
  delete json.sampling_seconds;
  delete json.analysis_seconds;
  delete json.steps_per_second;
  delete json.episodes_per_second;
  delete json.workers;
  json.projection = json.projection.map((row: Record<string, unknown>) => ({ ...row, seconds: null }));
  return json;
}

describe('reproducibility (the result is a pure function of env, policy, seed and episodes)', () => {
  const env = path.join(FIXTURES, 'textbook-samples', 'grid-4x3-slip.json');
  const policy = path.join(FIXTURES, 'textbook-samples', 'grid-4x3-policy.json');
  const args = ['estimate', '--env', env, '--policy', policy, '--episodes', '30000', '--json', '--no-store'];

  it('same seed: identical figures with 1 and 2 workers', () => {
    const one = reckon([...args, '--seed', '42', '--workers', '1']);
    const two = reckon([...args, '--seed', '42', '--workers', '2']);
    expect(one.code).toBe(0);
    expect(two.code).toBe(0);
    expect(figures(two.stdout)).toStrictEqual(figures(one.stdout));
  });

  it('a different seed gives a different mean', () => {
    const a = figures(reckon([...args, '--seed', '42', '--workers', '1']).stdout);
    const b = figures(reckon([...args, '--seed', '43', '--workers', '1']).stdout);
    expect(b.mean).not.toBe(a.mean);
  });

  it('the bootstrap interval is reproducible from the seed too', () => {
    const run = () => figures(reckon([...args, '--seed', '5', '--ci', 'bootstrap', '--episodes', '4000']).stdout);
    expect(run().ci).toStrictEqual(run().ci);
  });
});
