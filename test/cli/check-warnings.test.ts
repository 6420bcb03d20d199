import { describe, expect, it } from 'vitest';
import { reckon, tempFiles } from './run-cli.js';

/**
 * Valid definitions that are probably not what was meant: `check` warns (exit 0) under
 * "warnings". A one-row corridor S . . + where walking left only bumps into the wall.
 */
const dir = tempFiles({
  'corridor.json': {
    kind: 'gridworld',
    discount: 0.9,
    step_reward: -1,
    layout: ['S..+'],
    cells: { '.': {}, S: { start: 1 }, '+': { terminal: true, reward: 1 } },
  },
  'left.json': { kind: 'arrows', rows: ['<<<+'] },
  'right.json': { kind: 'arrows', rows: ['>>>+'] },
  'half-done.json': {
    kind: 'tabular',
    discount: 0.9,
    states: ['a', 'done'],
    actions: ['go'],
    start: { a: 0.5, done: 0.5 },
    terminal: ['done'],
    transitions: [{ from: 'a', action: 'go', to: 'done', p: 1, reward: 1 }],
  },
});

function warnings(args: string[]): string[] {
  const out = reckon(['check', ...args, '--json'], { cwd: dir });
  expect(out.code).toBe(0);
  return JSON.parse(out.stdout).warnings;
}

describe('check warnings', () => {
  it('a policy that only bumps into walls: stays in place, and no terminal is reachable', () => {
    const found = warnings(['--env', 'corridor.json', '--policy', 'left.json']);
    expect(found).toHaveLength(2);
    expect(found[0]).toContain('in state "0,0" the policy gives probability only to actions that lead back to the same state');
    expect(found[1]).toContain('no terminal state can be reached from the start under this policy: every episode runs to the horizon');
    const text = reckon(['check', '--env', 'corridor.json', '--policy', 'left.json'], { cwd: dir });
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/\n {2}warnings\n {4}- in state "0,0"/);
  });

  it('a start state that is terminal, and --start naming a terminal', () => {
    expect(warnings(['--env', 'half-done.json'])).toEqual(['start state "done" is terminal: episodes that start there end at once with return 0']);
    expect(warnings(['--env', 'corridor.json', '--policy', 'right.json', '--start', '0,3'])).toEqual(['--start "0,3" is a terminal state: every episode ends at once with return 0']);
  });

  it('a policy that reaches the terminal gets no warnings', () => {
    expect(warnings(['--env', 'corridor.json', '--policy', 'right.json'])).toEqual([]);
    const out = reckon(['check', '--env', 'corridor.json', '--policy', 'right.json'], { cwd: dir });
    expect(out.stdout).not.toContain('warnings');
  });
});
