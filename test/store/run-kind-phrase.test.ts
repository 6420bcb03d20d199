import { describe, expect, it } from 'vitest';
import { runKindPhrase } from '../../src/store/runs.js';

// English articles before a vowel sound (common practice): messages read "an estimate run".
describe('runKindPhrase', () => {
  it('puts the right article before each kind of run', () => {
    expect(runKindPhrase('estimate')).toBe('an estimate run');
    expect(runKindPhrase('offpolicy')).toBe('an off-policy run');
    expect(runKindPhrase('comparison')).toBe('a comparison run');
  });
});
