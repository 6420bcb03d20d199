import { InputError } from '../errors.js';
import { requireLevel } from './interval.js';
import { noncentralTCdf } from './noncentral-t-cdf.js';
import { normalQuantile, tQuantile } from './quantiles.js';

/**
 * Exact power of the two-sided paired t test at level α with n pairs when the true mean
 * difference is δ and the differences have standard deviation σ_D: the statistic follows a
 * noncentral t with n − 1 degrees of freedom and noncentrality δ√n/σ_D, so
 * power = 1 − F_{t'}(t_c) + F_{t'}(−t_c), t_c = t_{1−α/2, n−1} (docs/methods.md §7.2; Owen 1968,
 * Technometrics 10:445–478, from memory).
 */
export function pairedTestPower(pairs: number, effect: number, sigmaDifference: number, level: number): number {
  requireLevel(level);
  if (!Number.isInteger(pairs) || pairs < 2) throw new RangeError(`pairedTestPower: need an integer number of pairs ≥ 2 (got ${pairs})`);
  requirePlanInputs(effect, sigmaDifference);
  const df = pairs - 1;
  const critical = tQuantile(1 - (1 - level) / 2, df);
  const ncp = (effect * Math.sqrt(pairs)) / sigmaDifference;
  return 1 - noncentralTCdf(critical, df, ncp) + noncentralTCdf(-critical, df, ncp);
}

export interface PairedSampleSize {
  /** ⌈((z_{1−α/2} + z_{1−β}) σ_D/δ)²⌉: the normal approximation. */
  zPairs: number;
  /** The fixed point of n ← ⌈((t_{1−α/2, n−1} + t_{1−β, n−1}) σ_D/δ)²⌉, started from zPairs. */
  tPairs: number;
  /** Exact power at tPairs, from the noncentral t. */
  powerAtTPairs: number;
  /** The smallest n whose exact power reaches the target (usually tPairs or one either side). */
  exactPairs: number;
  powerAtExactPairs: number;
}

/**
 * Pairs (episodes per policy under common random numbers) needed to detect a true mean
 * difference δ with the given power by a two-sided paired t test at level α, from the pilot's
 * σ_D (docs/methods.md §7.2: z start, t refinement, exact power by the noncentral t; the t refinement
 * is common practice for sample-size planning). Check: δ = 0.1, σ_D = 0.5, power 0.8 at 95%
 * gives 197 (z) and 199 (t), power 0.8017 at 199 (scripts/methods/projections.py).
 */
export function pairedSampleSize(request: { effect: number; sigmaDifference: number; level?: number; power?: number }): PairedSampleSize {
  const level = request.level ?? 0.95;
  const power = request.power ?? 0.8;
  requireLevel(level);
  if (!(power > 0 && power < 1)) throw new InputError('--power', `must be strictly between 0 and 1 (got ${power})`);
  const { effect, sigmaDifference } = request;
  requirePlanInputs(effect, sigmaDifference);
  const alpha = 1 - level;
  const scale = (sigmaDifference / Math.abs(effect)) ** 2;
  const zPairs = Math.max(2, Math.ceil((normalQuantile(1 - alpha / 2) + normalQuantile(power)) ** 2 * scale));

  const tRule = (n: number) => Math.max(2, Math.ceil((tQuantile(1 - alpha / 2, n - 1) + tQuantile(power, n - 1)) ** 2 * scale));
  let tPairs = zPairs;
  let previous = Number.NaN;
  for (let i = 0; i < 100; i++) {
    const next = tRule(tPairs);
    if (next === tPairs) break;
    if (next === previous) {
      tPairs = Math.max(next, tPairs); // a 2-cycle: the larger value meets the rule
      break;
    }
    previous = tPairs;
    tPairs = next;
  }

  const powerAt = (n: number) => pairedTestPower(n, effect, sigmaDifference, level);
  let exactPairs = tPairs;
  let exactPower = powerAt(exactPairs);
  while (exactPower < power) exactPower = powerAt(++exactPairs);
  while (exactPairs > 2) {
    const fewer = powerAt(exactPairs - 1);
    if (fewer < power) break;
    exactPairs--;
    exactPower = fewer;
  }
  return { zPairs, tPairs, powerAtTPairs: powerAt(tPairs), exactPairs, powerAtExactPairs: exactPower };
}

function requirePlanInputs(effect: number, sigmaDifference: number): void {
  if (!Number.isFinite(effect) || effect === 0) throw new InputError('--effect', `must be a non-zero number (got ${effect})`);
  if (!(sigmaDifference > 0) || !Number.isFinite(sigmaDifference)) {
    throw new InputError('--sigma', `the standard deviation of the differences must be positive (got ${sigmaDifference})`);
  }
}
