import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { buildEnvironment } from '../../src/definitions/build-environment.js';
import { buildPolicy } from '../../src/definitions/build-policy.js';
import type { DefinitionSource } from '../../src/definitions/built.js';
import { parseEnvironment, parsePolicy } from '../../src/definitions/parse.js';
import { groupSchema } from '../../src/definitions/group-schema.js';

/** The README's definition examples are the ones users copy first: they must load as shown. */
const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const source: DefinitionSource = { label: 'README.md', baseDir: '/nowhere' };

/** Every ```json block of the README whose text is one JSON object with "kind" `kind`. */
function examples(kind: string): unknown[] {
  const blocks = [...readme.matchAll(/```json\n([\s\S]*?)```/g)].map((m) => m[1]);
  const found: unknown[] = [];
  for (const block of blocks) {
    for (const text of [block, ...block.split('\n')]) {
      try {
        const value = JSON.parse(text) as { kind?: unknown };
        if (value && value.kind === kind) found.push(value);
      } catch {
        // not a whole JSON object (a block of several one-line examples, or a fragment)
      }
    }
  }
  return found;
}

describe('README examples', () => {
  test('the gridworld example loads, and the arrows and table policies load on it', async () => {
    const [grid] = examples('gridworld');
    expect(grid).toBeDefined();
    const env = await buildEnvironment(parseEnvironment(grid, source), source);
    if (env.kind !== 'finite') throw new Error('expected a finite environment');
    expect(env.mdp.stateNames).toContain('0,0');
    const policies = [...examples('arrows'), ...examples('table')];
    expect(policies).toHaveLength(2);
    for (const policy of policies) {
      const built = await buildPolicy(parsePolicy(policy, source), env, source);
      expect(built.kind).toBe('matrix');
    }
  });

  test('the tabular example loads', async () => {
    const [tabular] = examples('tabular');
    const env = await buildEnvironment(parseEnvironment(tabular, source), source);
    expect(env.kind).toBe('finite');
  });

  test('the group file example is a valid group file', () => {
    const [group] = examples('group');
    expect(group).toBeDefined();
    expect(groupSchema.safeParse(group).success).toBe(true);
  });
});
