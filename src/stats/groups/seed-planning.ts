import { InputError } from '../../errors.js';
import { requireLevel } from '../interval.js';
import { noncentralTCdf } from '../noncentral-t-cdf.js';
import { normalQuantile, tQuantile } from '../quantiles.js';

/**
 * Episodes per member that minimise Var(Ȳ) = σ²_b/K + σ²_w/(Kn) for a fixed budget
 * K(c_seed + n·c_episode): n* = √((c_seed/c_episode)·σ²_w/σ²_b), the classic optimum of
 * two-stage sampling (Cochran 1977, ch. 10, the cost function of two-stage sampling, from memory;
 * docs/methods.md §15.5). Infinity when σ²_b = 0 (seeds then cost precision nothing) and at
 * least 2, since each member needs a spread.
 */
export function episodesPerMember(seedCost: number, episodeCost: number, withinVariance: number, betweenVariance: number): number {
  if (!(seedCost > 0) || !(episodeCost > 0)) throw new InputError('--seed-cost', `costs must be positive (seed ${seedCost} s, episode ${episodeCost} s)`);
  if (!(betweenVariance > 0)) return Infinity;
  return Math.max(2, Math.round(Math.sqrt((seedCost / episodeCost) * (withinVariance / betweenVariance))));
}

/**
 * Exact power of the two-sided two-sample t test with N per group and standardised
 * difference d: the statistic is noncentral t with 2N − 2 degrees of freedom and
 * noncentrality d·√(N/2) (Owen 1968, Technometrics 10:445–478; Cohen 1988, Statistical Power
 * Analysis, ch. 2; Colas et al. 2018 use it for the number of training seeds).
 */
export function twoSampleTestPower(perGroup: number, effectSize: number, level: number): number {
  requireLevel(level);
  if (!Number.isInteger(perGroup) || perGroup < 2) throw new RangeError(`twoSampleTestPower: need N ≥ 2 per group (got ${perGroup})`);
  const df = 2 * perGroup - 2;
  const critical = tQuantile(1 - (1 - level) / 2, df);
  const ncp = effectSize * Math.sqrt(perGroup / 2);
  return 1 - noncentralTCdf(critical, df, ncp) + noncentralTCdf(-critical, df, ncp);
}

/** The smallest N per group whose exact power reaches `power`, with that power. */
export function seedsForPower(effectSize: number, level: number, power: number): { seeds: number; power: number } {
  if (!Number.isFinite(effectSize) || effectSize === 0) throw new InputError('--difference', `the standardised difference must be non-zero (got ${effectSize})`);
  if (!(power > 0 && power < 1)) throw new InputError('--power', `must be strictly between 0 and 1 (got ${power})`);
  const d = Math.abs(effectSize);
  // Power grows with N: start near the normal approximation 2(z_{α/2} + z_β)²/d² and walk.
  const z = normalQuantile(1 - (1 - level) / 2) + normalQuantile(power);
  let n = Math.max(2, Math.floor((2 * z * z) / (d * d)));
  if (!Number.isFinite(n) || n > 1e8) return { seeds: Infinity, power: Number.NaN };
  let p = twoSampleTestPower(n, d, level);
  while (p < power) p = twoSampleTestPower(++n, d, level);
  while (n > 2) {
    const fewer = twoSampleTestPower(n - 1, d, level);
    if (fewer < power) break;
    n--;
    p = fewer;
  }
  return { seeds: n, power: p };
}

/**
 * The smallest K whose t_{K−1} interval on member means, t_{K−1}·√((σ²_b + σ²_w/n)/K), is at
 * most `halfWidth` (the planning form of the group interval; common practice).
 */
export function seedsForHalfWidth(halfWidth: number, betweenVariance: number, withinVariance: number, episodes: number, level: number): number {
  if (!(halfWidth > 0)) throw new InputError('--target-error', `must be positive (got ${halfWidth})`);
  requireLevel(level);
  const perMember = betweenVariance + withinVariance / episodes;
  for (let k = 2; k <= 1_000_000; k++) {
    if (tQuantile(1 - (1 - level) / 2, k - 1) * Math.sqrt(perMember / k) <= halfWidth) return k;
  }
  return Infinity;
}
