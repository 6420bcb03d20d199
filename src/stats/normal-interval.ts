import { makeInterval, requireLevel, requireTwoEpisodes, type Interval } from './interval.js';
import { normalQuantile } from './quantiles.js';
import type { ReturnSummary } from './summary.js';

/**
 * Normal (central limit theorem) interval X̄ ± z_{1−α/2} s/√n. Asymptotic only: slightly too
 * narrow for small n, where the t interval is the safer choice (common practice).
 */
export function normalInterval(summary: ReturnSummary, level: number): Interval {
  requireLevel(level);
  requireTwoEpisodes('normal', summary);
  const halfWidth = normalQuantile(1 - (1 - level) / 2) * summary.stderr;
  return makeInterval('normal', level, summary.mean - halfWidth, summary.mean + halfWidth);
}
