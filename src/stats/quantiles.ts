import betaQuantileImpl from '@stdlib/stats-base-dists-beta-quantile';
import binomialCdfImpl from '@stdlib/stats-base-dists-binomial-cdf';
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

/** Quantile of the Beta(a, b) distribution at p (Clopper–Pearson limits are beta quantiles). */
export function betaQuantile(p: number, a: number, b: number): number {
  return betaQuantileImpl(p, a, b);
}

/** P(B ≤ k) for B ~ Binomial(n, p); 0 for k < 0. */
export function binomialCdf(k: number, n: number, p: number): number {
  if (k < 0) return 0;
  if (k >= n) return 1;
  return binomialCdfImpl(k, n, p);
}
