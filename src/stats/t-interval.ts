import { makeInterval, requireLevel, requireTwoEpisodes, type Interval } from './interval.js';
import { tQuantile } from './quantiles.js';
import type { ReturnSummary } from './summary.js';

/**
 * Student t interval X̄ ± t_{1−α/2, n−1} s/√n: exact when returns are normal, and the usual
 * default otherwise because it is never narrower than the normal interval for small n
 * (Student 1908, Biometrika 6:1–25; formula as in NIST/SEMATECH e-Handbook 1.3.5.2).
 */
export function tInterval(summary: ReturnSummary, level: number): Interval {
  requireLevel(level);
  requireTwoEpisodes('t', summary);
  const halfWidth = tQuantile(1 - (1 - level) / 2, summary.n - 1) * summary.stderr;
  return makeInterval('t', level, summary.mean - halfWidth, summary.mean + halfWidth);
}
