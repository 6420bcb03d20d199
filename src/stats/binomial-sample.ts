import type { Xoshiro128 } from '../engine/xoshiro128.js';

/**
 * Binomial(m, p) probability mass at k, accurate to a few ulps also for m in the millions,
 * by Loader's saddle-point form (C. Loader 2000, "Fast and accurate computation of binomial
 * probabilities"; the method behind R's dbinom): f(k) = √(m/(2πk(m − k))) ·
 * exp(δ(m) − δ(k) − δ(m − k) − D(k, mp) − D(m − k, mq)), δ the Stirling error and
 * D(x, μ) = x log(x/μ) + μ − x. Taking log-factorials apart instead would lose about
 * log10(m log m) digits to cancellation.
 */
export function binomialPmf(k: number, m: number, p: number): number {
  if (k < 0 || k > m) return 0;
  const q = 1 - p;
  if (p === 0) return k === 0 ? 1 : 0;
  if (q === 0) return k === m ? 1 : 0;
  if (k === 0) return Math.exp(m * Math.log1p(-p));
  if (k === m) return Math.exp(m * Math.log(p));
  const exponent = stirlingError(m) - stirlingError(k) - stirlingError(m - k) - deviance(k, m * p) - deviance(m - k, m * q);
  return Math.sqrt(m / (2 * Math.PI * k * (m - k))) * Math.exp(exponent);
}

/**
 * One Binomial(m, p) draw by inversion with a search that starts at the mode and steps
 * outwards, alternately down and up (C. D. Kemp 1986, "A modal method for generating
 * binomial variables", Commun. Statist. Theory Methods 15:805–813): one uniform and about
 * one step per unit of the standard deviation, exact up to rounding, for any m. Neighbouring
 * masses follow from f(k + 1)/f(k) = (m − k)p/((k + 1)q).
 */
export function binomialSample(rng: Xoshiro128, m: number, p: number): number {
  if (m === 0 || p <= 0) return 0;
  if (p >= 1) return m;
  const q = 1 - p;
  if (m * p < SMALL_MEAN) return fromZero(rng.uniform(), m, p, q);
  const mode = Math.min(m, Math.floor((m + 1) * p));
  const u = rng.uniform();
  const atMode = binomialPmf(mode, m, p);
  let total = atMode;
  if (u < total) return mode;
  const up = p / q;
  let low = mode;
  let high = mode;
  let massLow = atMode;
  let massHigh = atMode;
  while (low > 0 || high < m) {
    if (low > 0) {
      massLow *= low / ((m - low + 1) * up);
      low--;
      total += massLow;
      if (u < total) return low;
    }
    if (high < m) {
      massHigh *= ((m - high) * up) / (high + 1);
      high++;
      total += massHigh;
      if (u < total) return high;
    }
  }
  return mode; // u fell in the rounding gap above the masses' computed sum (about 1e-15)
}

/** Below this mean, searching up from 0 (one exp, about mp steps) beats the saddle-point mass at the mode. */
const SMALL_MEAN = 8;

/** Inversion searching up from k = 0, f(0) = q^m (the sequential search of Devroye 1986, §X.4.3). */
function fromZero(u: number, m: number, p: number, q: number): number {
  let mass = Math.exp(m * Math.log1p(-p));
  let total = mass;
  const up = p / q;
  let k = 0;
  while (u >= total && k < m) {
    mass *= ((m - k) * up) / (k + 1);
    k++;
    total += mass;
  }
  return k;
}

const HALF_LOG_TWO_PI = 0.5 * Math.log(2 * Math.PI);
/** δ(n) for n = 0 … 15, from log n! summed exactly enough at these sizes. */
const SMALL_STIRLING_ERRORS: number[] = (() => {
  const table = [Number.NaN]; // δ(0) is infinite; k = 0 and k = m never reach the table
  let logFactorial = 0;
  for (let n = 1; n <= 15; n++) {
    logFactorial += Math.log(n);
    table.push(logFactorial - (n + 0.5) * Math.log(n) + n - HALF_LOG_TWO_PI);
  }
  return table;
})();

/** δ(n) = log n! − (n + ½) log n + n − ½ log 2π; for n > 15 its asymptotic series (Loader 2000). */
function stirlingError(n: number): number {
  if (n <= 15) return SMALL_STIRLING_ERRORS[n];
  const inverse = 1 / n;
  const inverse2 = inverse * inverse;
  return (
    inverse *
    (1 / 12 - inverse2 * (1 / 360 - inverse2 * (1 / 1260 - inverse2 * (1 / 1680 - inverse2 / 1188))))
  );
}

/** D(x, μ) = x log(x/μ) + μ − x, by a series in v = (x − μ)/(x + μ) when x is near μ (Loader 2000). */
function deviance(x: number, mu: number): number {
  if (Math.abs(x - mu) < 0.1 * (x + mu)) {
    const v = (x - mu) / (x + mu);
    const v2 = v * v;
    let sum = (x - mu) * v;
    let term = 2 * x * v;
    for (let j = 1; j < 1000; j++) {
      term *= v2;
      const next = sum + term / (2 * j + 1);
      if (next === sum) return next;
      sum = next;
    }
    return sum;
  }
  return x * Math.log(x / mu) + mu - x;
}
