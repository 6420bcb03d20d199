/**
 * Warnings for intervals used where they tend to under-cover, with the method to prefer. The
 * normal and bootstrap intervals are large-sample approximations: below a few dozen episodes
 * their coverage falls short of the level (Efron & Tibshirani 1993, An Introduction to the
 * Bootstrap, ch. 13–14), and a bootstrap of differences with many exact ties resamples few
 * distinct values. The thresholds (n < 50; over 20% ties below 200 pairs) are common practice,
 * not a published bound.
 */
const SMALL_SAMPLE = 50;
const TIED_SAMPLE = 200;
const TIED_SHARE = 0.2;

const APPROXIMATE = new Set(['normal', 'bootstrap', 'bootstrap-percentile']);

/** For one policy's interval of `n` returns. */
export function intervalWarnings(method: string, n: number, boundsKnown: boolean): string[] {
  if (!APPROXIMATE.has(method) || n >= SMALL_SAMPLE) return [];
  const better = boundsKnown ? "--ci t, or --ci betting for a guarantee that holds at any n" : '--ci t';
  return [`${n} episodes is few for a ${method} interval (below ${SMALL_SAMPLE} they tend to cover less than their level); prefer ${better}, or run more episodes`];
}

/** For a difference interval over paired differences (first − second). */
export function differenceWarnings(method: string, differences: Float64Array): string[] {
  const n = differences.length;
  const warnings = intervalWarnings(method, n, false);
  if ((method === 'bootstrap' || method === 'bootstrap-percentile') && n < TIED_SAMPLE && n > 0) {
    let ties = 0;
    for (let i = 0; i < n; i++) if (differences[i] === 0) ties++;
    if (ties / n > TIED_SHARE) {
      warnings.push(
        `${Math.round((100 * ties) / n)}% of the ${n} pairs returned exactly the same, and bootstrap intervals of such differences cover less than their level below ${TIED_SAMPLE} pairs; prefer --ci t (the paired t interval), or run more episodes`,
      );
    }
  }
  return warnings;
}
