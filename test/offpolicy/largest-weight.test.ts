/**
 * The largest possible weight on the 2-state example: staying in state 0 with action 1 (possible:
 * P(0 | 0, 1) = 0.3) three times gives (0.8/0.3)³ = 18.962963, the largest product of the ratios
 * 0.2/0.7, 0.8/0.3, 0.1/0.5, 0.9/0.5 (closed form; scripts/methods/off_policy.py prints the same
 * W for the third episode of the 3-episode log).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadEnvironmentFile, loadPolicyFile } from '../../src/definitions/load.js';
import { largestWeight } from '../../src/offpolicy/largest-weight.js';
import { runOffPolicy } from '../../src/offpolicy/run-offpolicy.js';
import { InputError } from '../../src/errors.js';
import { tempFiles } from '../cli/run-cli.js';

const OP = path.resolve(__dirname, '../fixtures/off-policy');

describe('the largest possible weight', () => {
  it('is (8/3)³ on the 2-state example', async () => {
    const env = await loadEnvironmentFile(path.join(OP, 'two-state-env.json'));
    if (env.built.kind !== 'finite') throw new Error('finite expected');
    const target = await loadPolicyFile(path.join(OP, 'two-state-target.json'), env.built);
    const behaviour = await loadPolicyFile(path.join(OP, 'two-state-behaviour.json'), env.built);
    expect(largestWeight(env.built.mdp, target.built.matrix!, behaviour.built.matrix!, [0])).toBeCloseTo((8 / 3) ** 3, 12);
  });
  it('gives the two-sided betting interval with --behaviour, and a wrong behaviour is refused at its line', async () => {
    const request = {
      logPath: path.join(OP, 'three-episodes.jsonl'),
      policyPath: path.join(OP, 'two-state-target.json'),
      envPath: path.join(OP, 'two-state-env.json'),
      behaviourPath: path.join(OP, 'two-state-behaviour.json'),
      estimators: ['is' as const],
      level: 0.95,
      seed: 1,
      resamples: 200,
      folds: 2,
    };
    const run = await runOffPolicy(request);
    expect(run.maxWeight).toBeCloseTo(18.962963, 6);
    const two = run.result.bounds.find((b) => b.method === 'betting')!;
    expect(two.high).not.toBeNull();
    expect(two.low).toBeLessThanOrEqual(two.high!);
    const dir = tempFiles({ 'other.json': { kind: 'uniform' } });
    await expect(runOffPolicy({ ...request, behaviourPath: path.join(dir, 'other.json') })).rejects.toThrow(
      /three-episodes\.jsonl: line 2: behaviour_prob 0\.3 differs from .*other\.json's 0\.5/,
    );
    await expect(runOffPolicy({ ...request, envPath: null })).rejects.toThrow(InputError);
  });

  it('is known from the logged behaviour_probs alone when they cover every state the behaviour can reach, and gives the same interval', async () => {
    // The 3-episode file with the behaviour's distribution on each line: (0.7, 0.3) in state 0, (0.5, 0.5) in state 1.
    const lines = readFileSync(path.join(OP, 'three-episodes.jsonl'), 'utf8').trim().split('\n');
    const withProbs = (keep: (state: number) => boolean) =>
      [lines[0], ...lines.slice(1).map((l) => {
        const step = JSON.parse(l);
        return JSON.stringify(keep(step.state) ? { ...step, behaviour_probs: step.state === 0 ? [0.7, 0.3] : [0.5, 0.5] } : step);
      })].join('\n');
    const dir = tempFiles({ 'all.jsonl': withProbs(() => true), 'state-0-only.jsonl': withProbs((s) => s === 0) });
    const request = {
      logPath: path.join(dir, 'all.jsonl'),
      policyPath: path.join(OP, 'two-state-target.json'),
      envPath: path.join(OP, 'two-state-env.json'),
      estimators: ['is' as const],
      level: 0.95,
      seed: 1,
      resamples: 200,
      folds: 2,
    };
    const logged = await runOffPolicy(request);
    expect(logged.maxWeightSource).toBe('logged');
    expect(logged.maxWeight).toBeCloseTo((8 / 3) ** 3, 12);
    const known = await runOffPolicy({ ...request, behaviourPath: path.join(OP, 'two-state-behaviour.json') });
    expect(known.maxWeightSource).toBe('behaviour');
    expect(logged.result.bounds.find((b) => b.method === 'betting')).toStrictEqual(known.result.bounds.find((b) => b.method === 'betting'));
    // State 1 is reachable (0 → 1 with probability 0.2 under either action) but its distribution is never logged.
    const partial = await runOffPolicy({ ...request, logPath: path.join(dir, 'state-0-only.jsonl') });
    expect(partial.maxWeight).toBeNull();
    expect(partial.result.bounds.find((b) => b.method === 'betting')!.note).toMatch(/the behaviour can reach state "1", whose behaviour_probs no line gives; give --behaviour FILE/);
    // Without the environment nothing bounds the weights.
    expect((await runOffPolicy({ ...request, envPath: null })).maxWeight).toBeNull();
  });
});
