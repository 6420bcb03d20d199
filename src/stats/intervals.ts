import { InputError } from '../errors.js';
import { bernsteinInterval } from './bernstein.js';
import { bcaBootstrapInterval } from './bootstrap-bca.js';
import { percentileBootstrapInterval } from './bootstrap-percentile.js';
import { hoeffdingInterval } from './hoeffding.js';
import { CI_METHODS, type CiMethod, type Interval } from './interval.js';
import { normalInterval } from './normal-interval.js';
import type { ReturnBounds } from './return-bounds.js';
import type { ReturnSummary } from './summary.js';
import { tInterval } from './t-interval.js';

export { CI_METHODS, type CiMethod, type Interval };

export interface IntervalRequest {
  method: CiMethod;
  /** Two-sided confidence level in (0, 1), e.g. 0.95. */
  level: number;
  /** Known limits of every return; required by `hoeffding` and `bernstein`. */
  bounds?: ReturnBounds | null;
  /** Run seed for the bootstrap methods (default 0). */
  seed?: number;
  /** Bootstrap resamples (default 2000). */
  resamples?: number;
  /** Told of the bootstrap's progress (resamples done of all). */
  onProgress?: (done: number, total: number) => void;
}

export function isCiMethod(name: string): name is CiMethod {
  return (CI_METHODS as readonly string[]).includes(name);
}

/**
 * One entry point for every interval method. `summary` must describe the first `summary.n`
 * entries of `returns`; only the bootstrap methods read `returns`, so the others accept a
 * summary alone (pass an empty array). Intervals are reported raw, never clipped, except that
 * Hoeffding and Bernstein intervals are intersected with the bounds they assume. Throws {@link InputError} for an unknown method, a level outside (0, 1),
 * fewer than 2 episodes, or missing or violated bounds.
 */
export function confidenceInterval(
  returns: Float64Array | number[],
  summary: ReturnSummary,
  request: IntervalRequest,
): Interval {
  const { method, level } = request;
  if (!isCiMethod(method)) {
    throw new InputError('--ci', `unknown method "${method}"; choose one of ${CI_METHODS.join(', ')}`);
  }
  const bootstrap = { seed: request.seed, resamples: request.resamples, onProgress: request.onProgress };
  switch (method) {
    case 't':
      return tInterval(summary, level);
    case 'normal':
      return normalInterval(summary, level);
    case 'hoeffding':
      return hoeffdingInterval(summary, level, request.bounds);
    case 'bernstein':
      return bernsteinInterval(summary, level, request.bounds);
    case 'bootstrap':
      requireReturnsFor(summary, returns);
      return bcaBootstrapInterval(returns, summary, level, bootstrap);
    case 'bootstrap-percentile':
      requireReturnsFor(summary, returns);
      return percentileBootstrapInterval(returns, summary, level, bootstrap);
  }
}

function requireReturnsFor(summary: ReturnSummary, returns: Float64Array | number[]): void {
  if (summary.n > returns.length) {
    throw new RangeError(`confidenceInterval: summary covers ${summary.n} returns but only ${returns.length} were given`);
  }
}
