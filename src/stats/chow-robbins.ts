import { InputError } from '../errors.js';
import { requireLevel } from './interval.js';
import { normalQuantile } from './quantiles.js';
import { makeSequentialInterval, type RunningInterval, type SequentialInterval } from './sequential-interval.js';

/**
 * Fixed-width sequential rule of Chow & Robbins (1965, "On the asymptotic theory of fixed-width
 * sequential confidence intervals for the mean", Ann. Math. Statist. 36:457–462; docs/methods.md §6.4):
 * stop at N = inf{n ≥ n0 : n ≥ (a_n/d)²(V_n + 1/n)} and report X̄_N ± d, with a_n = z_{1−α/2}
 * (any a_n → z will do) and V_n the sample variance. The 1/n term keeps it from stopping when
 * the first returns happen to be equal (it is in squared return units, so the rule is not scale
 * invariant). Coverage tends to the level only as d → 0: it is asymptotic, and labelled so.
 *
 * `interval()` reports X̄_n ± z·√((V_n + 1/n)/n), the smallest d the rule would stop at now;
 * {@link ChowRobbinsRule.reached} is the stopping test for a target d.
 */
export class ChowRobbinsRule implements RunningInterval {
  readonly level: number;
  readonly minEpisodes: number;
  private readonly z: number;
  private count = 0;
  private mean = 0;
  private squaredDeviations = 0;

  constructor(options: { level: number; minEpisodes?: number }) {
    requireLevel(options.level);
    this.level = options.level;
    this.minEpisodes = options.minEpisodes ?? 2;
    if (!Number.isInteger(this.minEpisodes) || this.minEpisodes < 2) {
      throw new InputError('--min-episodes', `must be an integer ≥ 2 (got ${this.minEpisodes})`);
    }
    this.z = normalQuantile(1 - (1 - options.level) / 2);
  }

  get episodes(): number {
    return this.count;
  }

  add(values: Float64Array | number[]): void {
    for (let i = 0; i < values.length; i++) {
      const x = values[i];
      if (!Number.isFinite(x)) throw new InputError('returns', `episode ${this.count} has a return that is not a finite number (${x})`);
      this.count++;
      const delta = x - this.mean;
      this.mean += delta / this.count;
      this.squaredDeviations += delta * (x - this.mean);
    }
  }

  /** True once n ≥ n0 and n ≥ (z/d)²(V_n + 1/n): stop and report X̄ ± d. */
  reached(halfWidth: number): boolean {
    if (!(halfWidth > 0)) throw new InputError('target half-width', `must be a positive number (got ${halfWidth})`);
    return this.count >= this.minEpisodes && this.currentHalfWidth() <= halfWidth;
  }

  interval(): SequentialInterval {
    const halfWidth = this.currentHalfWidth();
    return makeSequentialInterval('chow-robbins-asymptotic', this.level, this.count, this.mean - halfWidth, this.mean + halfWidth, false);
  }

  private currentHalfWidth(): number {
    const n = this.count;
    if (n < 2) return Infinity;
    const variance = this.squaredDeviations / (n - 1);
    return this.z * Math.sqrt((variance + 1 / n) / n);
  }
}
