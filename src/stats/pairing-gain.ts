import { requireSamePairs } from './paired-differences.js';

/** How much running two policies on common random numbers helped. */
export interface PairingGain {
  /** Pearson correlation of the paired returns; NaN when either sample is constant. */
  correlation: number;
  /** Sample variances (divisor n − 1) of the first, second and difference samples. */
  varianceFirst: number;
  varianceSecond: number;
  varianceDifference: number;
  /**
   * (Var A + Var B)/Var(A − B): the factor by which pairing cut the episodes needed for a given
   * precision of the mean difference, against independent runs of the same size. Above 1 when
   * the returns are positively correlated. Infinity when the differences are constant but the
   * returns are not; NaN when everything is constant.
   */
  varianceReduction: number;
}

/**
 * Var(D̄) = (σ_A² + σ_B² − 2 Cov(A, B))/n under common random numbers, against (σ_A² + σ_B²)/n
 * for independent runs (Law & Kelton, Simulation Modeling and Analysis, on common random
 * numbers; Glasserman & Yao 1992, Mgmt Sci 38:884–908; both from memory; docs/methods.md
 * §8.1), so the ratio of the two is the cost saved. Two-pass sums around the means keep the digits of returns with a large
 * offset (Chan, Golub & LeVeque 1983).
 */
export function pairingGain(first: Float64Array | number[], second: Float64Array | number[]): PairingGain {
  requireSamePairs(first, second);
  const n = first.length;
  if (n < 2) throw new RangeError(`pairingGain: need at least 2 pairs (got ${n})`);
  let sumFirst = 0;
  let sumSecond = 0;
  for (let i = 0; i < n; i++) {
    sumFirst += first[i];
    sumSecond += second[i];
  }
  const meanFirst = sumFirst / n;
  const meanSecond = sumSecond / n;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  let sdd = 0;
  for (let i = 0; i < n; i++) {
    const dx = first[i] - meanFirst;
    const dy = second[i] - meanSecond;
    sxx += dx * dx;
    syy += dy * dy;
    sxy += dx * dy;
    sdd += (dx - dy) * (dx - dy);
  }
  const correlation = sxx > 0 && syy > 0 ? Math.max(-1, Math.min(1, sxy / Math.sqrt(sxx * syy))) : Number.NaN;
  const independent = sxx + syy;
  const varianceReduction = sdd > 0 ? independent / sdd : independent > 0 ? Infinity : Number.NaN;
  return {
    correlation,
    varianceFirst: sxx / (n - 1),
    varianceSecond: syy / (n - 1),
    varianceDifference: sdd / (n - 1),
    varianceReduction,
  };
}
