import { STREAM, streamFor } from '../../engine/streams.js';
import { requireLevel } from '../interval.js';

/**
 * The lower bound of Thomas, Theocharous & Ghavamzadeh ("High confidence off-policy
 * evaluation", AAAI 2015, Theorem 1) with one threshold c for every value: for independent
 * X_i ≥ 0 with mean μ and Y_i = min(X_i, c), with probability at least 1 − δ
 *   μ ≥ Ȳ − 7c ln(2/δ)/(3(n − 1)) − √(2 ln(2/δ) s²_Y / n),
 * an empirical Bernstein bound (Maurer & Pontil 2009) on the truncated values; truncating
 * only lowers the mean, so the bound holds for μ. c must not be chosen on the same values.
 * `confidence` is 1 − δ.
 */
export function truncatedBernsteinLowerBound(x: Float64Array | number[], threshold: number, confidence: number): number {
  requireLevel(confidence);
  const n = x.length;
  if (n < 2) return Number.NEGATIVE_INFINITY;
  const logTerm = Math.log(2 / (1 - confidence));
  let sum = 0;
  let squares = 0;
  for (let i = 0; i < n; i++) {
    const y = Math.min(x[i], threshold);
    sum += y;
    squares += y * y;
  }
  // n Σy² − (Σy)² = n(n − 1)s², written as the theorem's pairwise form
  const spread = Math.max(0, n * squares - sum * sum);
  return sum / n - (7 * threshold * logTerm) / (3 * (n - 1)) - Math.sqrt((2 * logTerm * spread) / (n - 1)) / n;
}

export interface HeldOutLowerBound {
  readonly lowerBound: number;
  readonly threshold: number;
  readonly heldOut: number;
}

/**
 * The bound with its threshold chosen as the paper does: on a held-out part of the values
 * (`fraction`, at least 2), the c that maximises the bound predicted for the remaining size;
 * the bound itself is computed on the rest only. The split is a seeded permutation, so the
 * result is reproducible. Candidates: the held-out values' quantiles 0.5, 0.55 … 1 times 1,
 * 1.5, 2 and 3.
 */
export function heldOutLowerBound(x: Float64Array | number[], confidence: number, seed: number, fraction = 0.05): HeldOutLowerBound {
  const n = x.length;
  const heldOut = Math.max(2, Math.round(fraction * n));
  if (n - heldOut < 2) return { lowerBound: Number.NEGATIVE_INFINITY, threshold: Number.NaN, heldOut };
  const order = Int32Array.from({ length: n }, (_, i) => i);
  const rng = streamFor(seed, STREAM.BOOTSTRAP, 1);
  for (let i = n - 1; i > 0; i--) {
    const j = rng.integer(i + 1);
    [order[i], order[j]] = [order[j], order[i]];
  }
  const held = Float64Array.from({ length: heldOut }, (_, i) => x[order[i]]).sort();
  const rest = Float64Array.from({ length: n - heldOut }, (_, i) => x[order[heldOut + i]]);
  const m = rest.length;
  const logTerm = Math.log(2 / (1 - confidence));
  const predicted = (c: number): number => {
    let sum = 0;
    let squares = 0;
    for (const v of held) {
      const y = Math.min(v, c);
      sum += y;
      squares += y * y;
    }
    const mean = sum / held.length;
    const variance = Math.max(0, (squares - held.length * mean * mean) / (held.length - 1));
    return mean - (7 * c * logTerm) / (3 * (m - 1)) - Math.sqrt((2 * logTerm * variance) / m);
  };
  let best = Number.NaN;
  let bestValue = Number.NEGATIVE_INFINITY;
  for (let q = 0; q <= 10; q++) {
    const position = (0.5 + q * 0.05) * (held.length - 1);
    const below = Math.floor(position);
    const quantile = held[below] + (position - below) * ((held[Math.min(below + 1, held.length - 1)] ?? 0) - held[below]);
    for (const factor of [1, 1.5, 2, 3]) {
      const c = quantile * factor;
      if (!(c > 0)) continue;
      const value = predicted(c);
      if (value > bestValue) {
        bestValue = value;
        best = c;
      }
    }
  }
  if (!(best > 0)) best = 1;
  return { lowerBound: truncatedBernsteinLowerBound(rest, best, confidence), threshold: best, heldOut };
}
