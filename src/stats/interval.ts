import { InputError } from '../errors.js';
import type { ReturnSummary } from './summary.js';

/** The interval methods reckon offers; `t` is the default. */
export const CI_METHODS = ['t', 'normal', 'bootstrap', 'bootstrap-percentile', 'hoeffding', 'bernstein'] as const;
export type CiMethod = (typeof CI_METHODS)[number];

/** A two-sided interval for the mean return at confidence `level`. */
export interface Interval {
  method: CiMethod;
  level: number;
  low: number;
  high: number;
  /** (high − low)/2: the ± a reader sees, also for intervals that are not symmetric. */
  halfWidth: number;
}

export function makeInterval(method: CiMethod, level: number, low: number, high: number): Interval {
  return { method, level, low, high, halfWidth: (high - low) / 2 };
}

/** Refuses a confidence level outside (0, 1); every method needs α = 1 − level > 0. */
export function requireLevel(level: number): void {
  if (!(level > 0 && level < 1)) {
    throw new InputError('--level', `must be a number strictly between 0 and 1, e.g. 0.95 (got ${level})`);
  }
}

/** Refuses samples too small to estimate a spread from. */
export function requireTwoEpisodes(method: CiMethod, summary: ReturnSummary): void {
  if (summary.n < 2) {
    throw new InputError(
      '--ci ' + method,
      `at least 2 episodes are needed for a confidence interval (got ${summary.n})`,
    );
  }
}
