import { InputError } from '../errors.js';
import { parseOption } from './parse-option.js';

/** Default episodes of a fixed-size run, and the default cap of a run until a target error. */
export const DEFAULT_EPISODES = 10_000;
export const DEFAULT_MAX_EPISODES = 10_000_000;

/**
 * How long a run is, from `--episodes`, `--max-episodes` and `--target-error` (shared by
 * estimate and compare): a fixed number of episodes, or a target error with a cap, which
 * either option may give.
 */
export function runSize(values: { episodes?: string; 'max-episodes'?: string; 'target-error'?: string }): {
  episodes: number;
  targetError: number | null;
} {
  const targetError = values['target-error'] === undefined ? null : parseOption('target-error', 'targetError', values['target-error']);
  if (values.episodes !== undefined && values['max-episodes'] !== undefined) {
    throw new InputError('--max-episodes', 'give either --episodes or --max-episodes, not both');
  }
  if (values['max-episodes'] !== undefined && targetError === null) {
    throw new InputError('--max-episodes', 'caps a --target-error run; without --target-error use --episodes');
  }
  const name = values['max-episodes'] !== undefined ? 'max-episodes' : 'episodes';
  const text = values['max-episodes'] ?? values.episodes;
  const episodes = text === undefined ? (targetError === null ? DEFAULT_EPISODES : DEFAULT_MAX_EPISODES) : parseOption(name, 'episodes', text);
  return { episodes, targetError };
}
