/**
 * Strict reading of logged-episode files: every refusal is one line naming the file and the
 * line (the contract of reckon's input errors; the format is reckon's own, documented in the
 * README). Checks of bad input: common practice.
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { END_TERMINAL, END_TRUNCATED, NEXT_TERMINAL, parseEpisodeLog, readEpisodeLog } from '../../src/definitions/episode-log.js';
import { InputError } from '../../src/errors.js';
import { targetOnLog } from '../../src/offpolicy/target-on-log.js';
import { tempFiles } from '../cli/run-cli.js';

const HEADER = '{"kind": "header", "discount": 0.9, "reward_bounds": [0, 1], "horizon": 3, "actions": ["a", "b"]}';
const step = (fields: Record<string, unknown>) =>
  JSON.stringify({ episode: 1, t: 0, state: 's', action: 'a', reward: 0.5, behaviour_prob: 0.5, end: 'terminal', ...fields });

function refusal(lines: string[]): string {
  try {
    parseEpisodeLog(lines.join('\n'), 'log.jsonl');
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    const message = (e as Error).message;
    expect(message).not.toContain('\n');
    return message;
  }
  throw new Error('the log was accepted');
}

describe('reading a log', () => {
  it('groups interleaved steps by episode and orders them by t', () => {
    const log = parseEpisodeLog(
      [
        HEADER,
        step({ episode: 'x', t: 1, state: 'u', action: 'b', reward: 1, end: 'truncated' }),
        step({ episode: 'y', t: 0, end: 'terminal' }),
        step({ episode: 'x', t: 0, state: 's', end: null }),
      ].join('\n'),
      'log.jsonl',
    );
    expect(log.episodeIds).toEqual(['x', 'y']);
    expect(Array.from(log.episodeStart)).toEqual([0, 2, 3]);
    expect(log.stateNames).toEqual(['u', 's']);
    expect(Array.from(log.state)).toEqual([1, 0, 1]);
    expect(Array.from(log.action)).toEqual([0, 1, 0]);
    expect(Array.from(log.line)).toEqual([4, 2, 3]);
    expect(Array.from(log.nextState)).toEqual([0, -1, NEXT_TERMINAL]);
    expect(Array.from(log.episodeEnd)).toEqual([END_TRUNCATED, END_TERMINAL]);
  });
  it('streams a file and hashes its bytes', async () => {
    const dir = tempFiles({ 'log.jsonl': `${HEADER}\n${step({})}\n` });
    const log = await readEpisodeLog(path.join(dir, 'log.jsonl'));
    expect(log.bytes).toBe(HEADER.length + step({}).length + 2);
    expect(log.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(log.state.length).toBe(1);
  });
});

describe('bad logs are refused with the line', () => {
  it('malformed JSON', () => {
    expect(refusal([HEADER, '{"episode": 1, "t": 0,,}'])).toMatch(/^log\.jsonl: line 2: column \d+: /);
  });
  it('missing fields', () => {
    const line = JSON.stringify({ episode: 1, t: 0, state: 's', action: 'a', reward: 0, end: 'terminal' });
    expect(refusal([HEADER, line])).toMatch(/^log\.jsonl: line 2: behaviour_prob /);
    const noEnd = JSON.stringify({ episode: 1, t: 0, state: 's', action: 'a', reward: 0, behaviour_prob: 1 });
    expect(refusal([noEnd])).toMatch(/^log\.jsonl: line 1: end /);
  });
  it('an unknown field', () => {
    expect(refusal([HEADER, step({ behavior_prob: 0.5 })])).toMatch(/^log\.jsonl: line 2: .*behavior_prob/);
  });
  it('p = 0 and p > 1', () => {
    expect(refusal([HEADER, step({ behaviour_prob: 0 })])).toMatch(/^log\.jsonl: line 2: behaviour_prob must be in \(0, 1\] \(got 0\)/);
    expect(refusal([HEADER, step({ behaviour_prob: 1.5 })])).toMatch(/^log\.jsonl: line 2: behaviour_prob must be in \(0, 1\] \(got 1\.5\)/);
  });
  it('a duplicate step', () => {
    expect(refusal([HEADER, step({ end: null }), step({ t: 1 }), step({ t: 1 })])).toBe(
      'log.jsonl: line 4: duplicate step: episode "1" already has t = 1 on line 3',
    );
  });
  it('a missing step', () => {
    expect(refusal([HEADER, step({ end: null }), step({ t: 2 })])).toMatch(/^log\.jsonl: line 3: episode "1" has t = 2 but no step t = 1/);
  });
  it('a reward outside the bounds', () => {
    expect(refusal([HEADER, step({ reward: 1.5 })])).toBe("log.jsonl: line 2: reward 1.5 is outside the header's reward_bounds [0, 1]");
  });
  it('an action not in the header', () => {
    expect(refusal([HEADER, step({ action: 'c' })])).toMatch(/^log\.jsonl: line 2: action "c" is not one of the header's actions/);
  });
  it('an episode without an end, and a step after the end', () => {
    expect(refusal([HEADER, step({ end: null })])).toMatch(/^log\.jsonl: line 2: episode "1" has no end/);
    expect(refusal([HEADER, step({}), step({ t: 1 })])).toMatch(/^log\.jsonl: line 2: episode "1" ends at t = 0 .* but has a step t = 1 on line 3/);
  });
  it('a header that is not first, and an episode longer than the horizon', () => {
    expect(refusal([step({}), HEADER])).toMatch(/^log\.jsonl: line 2: a header may only be the first line/);
    const long = [0, 1, 2, 3].map((t) => step({ t, end: t === 3 ? 'terminal' : null }));
    expect(refusal([HEADER, ...long])).toMatch(/^log\.jsonl: line 5: episode "1" has 4 steps, more than the header's horizon 3/);
  });
  it('behaviour_probs that disagree with behaviour_prob or do not sum to 1', () => {
    expect(refusal([HEADER, step({ behaviour_probs: { a: 0.4, b: 0.6 } })])).toMatch(/^log\.jsonl: line 2: behaviour_prob 0\.5 disagrees/);
    expect(refusal([HEADER, step({ behaviour_probs: [0.5, 0.6] })])).toMatch(/^log\.jsonl: line 2: behaviour_probs sums to 1\.1/);
  });
  it('an empty log', () => {
    expect(refusal([HEADER])).toMatch(/^log\.jsonl: the log has no steps/);
  });
  it('a target policy that does not know a logged state', async () => {
    const dir = tempFiles({ 'target.json': { kind: 'table', states: { s: 'a' } } });
    const log = parseEpisodeLog([HEADER, step({ end: null }), step({ t: 1, state: 'q' })].join('\n'), 'log.jsonl');
    await expect(targetOnLog(log, path.join(dir, 'target.json'), null, null)).rejects.toThrow(
      /^log\.jsonl: line 3: state "q" is not known to the target policy .*target\.json/,
    );
  });
});

describe('the fast path for plain step lines', () => {
  it('accepts only what the schema accepts (the schema stays the one definition)', async () => {
    const { plainStep, logStepSchema } = await import('../../src/definitions/episode-log-schema.js');
    const base = { episode: 1, t: 0, state: 's', action: 'a', reward: 0.5, behaviour_prob: 0.5, end: null };
    const variants: Record<string, unknown>[] = [
      base,
      { ...base, kind: 'step' },
      { ...base, kind: 'header' },
      { ...base, episode: '' },
      { ...base, episode: 1.5 },
      { ...base, t: -1 },
      { ...base, t: 0.5 },
      { ...base, state: null },
      { ...base, state: [1, 2] },
      { ...base, reward: Number.NaN },
      { ...base, reward: '1' },
      { ...base, behaviour_prob: 0 },
      { ...base, behaviour_prob: 1 },
      { ...base, behaviour_prob: 1.0000001 },
      { ...base, end: 'done' },
      { ...base, end: undefined },
      { ...base, behaviour_probs: [0.5, 0.5] },
      { ...base, behaviour_probs: [0.5, -0.5] },
      { ...base, behaviour_probs: { a: 0.5, b: 0.5 } },
      { ...base, next_state: 's' },
      { ...base, next_state: null },
      { ...base, extra: 1 },
      { episode: 1, t: 0, state: 's', action: 'a', reward: 0, behaviour_prob: 1 },
    ];
    let fast = 0;
    for (const v of variants) {
      const json = JSON.parse(JSON.stringify(v));
      if (plainStep(json)) {
        fast++;
        expect(logStepSchema.safeParse(json).success, JSON.stringify(v)).toBe(true);
      }
    }
    expect(fast).toBeGreaterThanOrEqual(5);
  });
});
