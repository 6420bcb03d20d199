import normalCdfImpl from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantileImpl from '@stdlib/stats-base-dists-normal-quantile';
import tQuantileImpl from '@stdlib/stats-base-dists-t-quantile';

/**
 * Thin wrappers over stdlib's distribution functions, so the rest of reckon names one place
 * for its quantiles. Reference values: NIST/SEMATECH e-Handbook of Statistical Methods,
 * section 1.3.6.7.2 (critical values of the t distribution, including its ∞ row).
 */

/** Standard normal quantile Φ⁻¹(p), p in (0, 1); ±Infinity at p = 0 or 1. */
export function normalQuantile(p: number): number {
  return normalQuantileImpl(p, 0, 1);
}

/** Standard normal cumulative distribution Φ(x). */
export function normalCdf(x: number): number {
  return normalCdfImpl(x, 0, 1);
}

/**
 * Student t quantile with `df` degrees of freedom. `df` may be fractional (≥ 1); at
 * df = Infinity the t distribution is the standard normal, which stdlib does not handle,
 * so we switch to {@link normalQuantile} there.
 */
export function tQuantile(p: number, df: number): number {
  if (!(df >= 1)) throw new RangeError(`tQuantile: degrees of freedom must be ≥ 1 (got ${df})`);
  if (df === Infinity) return normalQuantile(p);
  return tQuantileImpl(p, df);
}
