import { InputError } from '../errors.js';
import { defaultTruncation } from './betting-projection.js';
import { requireLevel } from './interval.js';
import type { ReturnBounds } from './return-bounds.js';
import { makeSequentialInterval, requireValidBounds, unitScaled, type RunningInterval, type SequentialInterval } from './sequential-interval.js';

/**
 * How the bets are sized. Any predictable bet keeps the sequence valid; the schedule only
 * decides at which n it is narrowest.
 * - `anytime`: the predictable plug-in bet λ_t = √(2 ln(2/α)/(σ̂²_{t−1} t ln(1+t)))
 *   (Waudby-Smith & Ramdas 2024, eq. (26)), for open-ended monitoring;
 * - `planned`: tuned to a known run size n, λ_t = √(2 ln(2/α)/(n σ̂²_{t−1})) (their fixed-n
 *   "betting CI", Section 4.3), still valid at every t;
 * - `target`: aimed at a target half-width E (in return units), tuned to the horizon at which
 *   a tuned sequence reaches E: n*_t = max(t, 2 ln(2/α) σ̂²_{t−1}/e²), e = E/(b − a)
 *   (docs/methods.md §6.6). A run's cap bounds the horizon: bets are never tuned beyond the
 *   episodes the run may take.
 */
export type BetSchedule =
  | { readonly kind: 'anytime' }
  | { readonly kind: 'planned'; readonly episodes: number }
  | { readonly kind: 'target'; readonly halfWidth: number; readonly maxEpisodes?: number };

export interface BettingOptions {
  /** Two-sided confidence level, e.g. 0.95. */
  readonly level: number;
  /** Limits [a, b] of every value; returns are mapped to [0, 1] by them. */
  readonly bounds: ReturnBounds;
  readonly schedule: BetSchedule;
  /**
   * c in λ⁺(m) = min(λ, c/m), λ⁻(m) = min(λ, c/(1 − m)), in (0, 1): the paper recommends 1/2
   * or 3/4. Default 1/2, and 3/4 for bets aimed at a target, which are moderate already and
   * otherwise lose to the cap on returns near a bound (docs/methods.md §6.6).
   */
  readonly truncation?: number;
  /** Hedging weight θ between the two capitals; default 1/2. */
  readonly hedge?: number;
  /** Candidate means tracked at once (default 128). */
  readonly gridSize?: number;
}

/** Factors multiplied before one logarithm is taken; each lies in [1 − c, 1 + 5.5], so 32 never overflow. */
const FOLD = 32;
/** Bisection steps that refine a reported endpoint between two neighbouring grid points. */
const REFINE_STEPS = 24;

/**
 * Hedged-capital betting confidence sequence for a bounded mean (Waudby-Smith & Ramdas,
 * "Estimating means of bounded random variables by betting", JRSS-B 86(1), 2024, Theorem 3).
 * With x ∈ [0, 1] and a candidate mean m, the capitals
 *   K⁺_t(m) = Π_{i≤t} (1 + λ⁺_i(m)(x_i − m)),  K⁻_t(m) = Π_{i≤t} (1 − λ⁻_i(m)(x_i − m))
 * are nonnegative martingales under m = μ, so by Ville's inequality the set
 * { m : max(θK⁺_t(m), (1 − θ)K⁻_t(m)) < 1/α } covers μ at every t at once, and so does the
 * running intersection over t, which is what is reported. The plug-in mean and variance are
 * μ̂_t = (1/2 + Σx_i)/(t + 1) and σ̂²_t = (1/4 + Σ(x_i − μ̂_i)²)/(t + 1) (their eq. (25)); the
 * bet at t uses σ̂²_{t−1} only, which is what makes it predictable.
 *
 * K⁺_t is non-increasing in m and K⁻_t non-decreasing, so the excluded candidates are a prefix
 * and a suffix of any grid. The sequence streams: it keeps a grid of candidate means spanning
 * the current interval with their capitals (one multiply-add a point an episode), reports the
 * last excluded grid points (outward, so never narrower than the truth), and rebuilds the grid
 * from the kept history when half of its points are excluded. {@link refined} sharpens the two
 * endpoints by bisection on the current capital between neighbouring grid points, which is the
 * current set intersected with the running one, and so still valid.
 */
export class BettingSequence implements RunningInterval {
  readonly level: number;
  readonly schedule: BetSchedule;
  private readonly bounds: ReturnBounds;
  private readonly truncation: number;
  private readonly thresholdLow: number;
  private readonly thresholdHigh: number;
  private readonly logTerm: number;
  /** Target half-width on the [0, 1] scale (target schedule only). */
  private readonly unitTarget: number;
  private readonly gridSize: number;

  private xs = new Float64Array(1024);
  private bets = new Float64Array(1024);
  private count = 0;
  private sum = 0;
  private squaredDeviations = 0;

  private readonly grid: Float64Array;
  private readonly capLow: Float64Array;
  private readonly capHigh: Float64Array;
  private readonly logLow: Float64Array;
  private readonly logHigh: Float64Array;
  private readonly productLow: Float64Array;
  private readonly productHigh: Float64Array;
  /** Largest grid index excluded from below (−1: none) and smallest excluded from above (gridSize: none). */
  private lowIndex = -1;
  private highIndex: number;
  private low = 0;
  private high = 1;
  private rebuildCount = 0;

  constructor(options: BettingOptions) {
    requireLevel(options.level);
    if (options.bounds == null) throw new InputError('--bounds', 'the betting sequence needs return bounds LOW,HIGH');
    this.level = options.level;
    this.bounds = requireValidBounds(options.bounds);
    this.schedule = options.schedule;
    this.truncation = options.truncation ?? defaultTruncation(options.schedule);
    if (!(this.truncation > 0 && this.truncation < 1)) throw new RangeError(`BettingSequence: truncation must be in (0, 1) (got ${this.truncation})`);
    const hedge = options.hedge ?? 0.5;
    if (!(hedge > 0 && hedge < 1)) throw new RangeError(`BettingSequence: hedge must be in (0, 1) (got ${hedge})`);
    const alpha = 1 - options.level;
    this.logTerm = Math.log(2 / alpha);
    this.thresholdLow = Math.log(1 / (hedge * alpha));
    this.thresholdHigh = Math.log(1 / ((1 - hedge) * alpha));
    const schedule = options.schedule;
    if (schedule.kind === 'planned' && !(schedule.episodes >= 1)) throw new RangeError(`BettingSequence: planned episodes must be ≥ 1 (got ${schedule.episodes})`);
    if (schedule.kind === 'target' && !(schedule.halfWidth > 0)) throw new RangeError(`BettingSequence: target half-width must be > 0 (got ${schedule.halfWidth})`);
    this.unitTarget = schedule.kind === 'target' ? schedule.halfWidth / (this.bounds[1] - this.bounds[0]) : Number.NaN;
    this.gridSize = options.gridSize ?? 128;
    if (!(Number.isInteger(this.gridSize) && this.gridSize >= 8)) throw new RangeError(`BettingSequence: gridSize must be an integer ≥ 8 (got ${this.gridSize})`);
    const size = this.gridSize;
    this.grid = new Float64Array(size);
    this.capLow = new Float64Array(size);
    this.capHigh = new Float64Array(size);
    this.logLow = new Float64Array(size);
    this.logHigh = new Float64Array(size);
    this.productLow = new Float64Array(size).fill(1);
    this.productHigh = new Float64Array(size).fill(1);
    this.highIndex = size;
    this.placeGrid(0, 1);
  }

  get episodes(): number {
    return this.count;
  }

  /** Grid rebuilds so far (for the benchmark's cost figures). */
  get rebuilds(): number {
    return this.rebuildCount;
  }

  /** The bet λ_t of every episode so far (untruncated), for checks against the paper's formulas. */
  betHistory(): Float64Array {
    return this.bets.slice(0, this.count);
  }

  add(values: Float64Array | number[]): void {
    for (let k = 0; k < values.length; k++) {
      const x = unitScaled(values[k], this.bounds, this.count);
      this.step(x);
    }
  }

  /** The running interval on the grid: what a run checks after every episode. */
  interval(): SequentialInterval {
    return this.report(this.low, this.high);
  }

  /** The running interval with both endpoints refined by bisection (O(t) a step of the bisection). */
  refined(): SequentialInterval {
    let low = this.low;
    let high = this.high;
    if (this.lowIndex >= 0 && this.lowIndex + 1 < this.gridSize) {
      let excluded = this.grid[this.lowIndex];
      let kept = Math.min(this.grid[this.lowIndex + 1], this.high);
      for (let s = 0; s < REFINE_STEPS; s++) {
        const mid = (excluded + kept) / 2;
        if (this.logCapital(mid, 1) >= this.thresholdLow) excluded = mid;
        else kept = mid;
      }
      low = excluded;
    }
    if (this.highIndex < this.gridSize && this.highIndex - 1 >= 0) {
      let excluded = this.grid[this.highIndex];
      let kept = Math.max(this.grid[this.highIndex - 1], low);
      for (let s = 0; s < REFINE_STEPS; s++) {
        const mid = (excluded + kept) / 2;
        if (this.logCapital(mid, -1) >= this.thresholdHigh) excluded = mid;
        else kept = mid;
      }
      high = excluded;
    }
    return this.report(low, high);
  }

  /** log K⁺_t(m) (side 1) or log K⁻_t(m) (side −1) from the whole history. */
  logCapital(m: number, side: 1 | -1): number {
    const cap = side === 1 ? (m > 0 ? this.truncation / m : Infinity) : m < 1 ? this.truncation / (1 - m) : Infinity;
    let log = 0;
    let product = 1;
    const { xs, bets } = this;
    for (let i = 0; i < this.count; i++) {
      const bet = bets[i] < cap ? bets[i] : cap;
      product *= 1 + side * bet * (xs[i] - m);
      if ((i + 1) % FOLD === 0) {
        log += Math.log(product);
        product = 1;
      }
    }
    return log + Math.log(product);
  }

  private report(low: number, high: number): SequentialInterval {
    const [a, b] = this.bounds;
    const width = b - a;
    return makeSequentialInterval('betting', this.level, this.count, a + width * low, a + width * high, true);
  }

  /** λ_t for the next episode t = count + 1, from σ̂²_{t−1}. */
  private nextBet(): number {
    const t = this.count + 1;
    const variance = (0.25 + this.squaredDeviations) / t;
    const schedule = this.schedule;
    let horizon: number;
    if (schedule.kind === 'anytime') horizon = t * Math.log1p(t);
    else if (schedule.kind === 'planned') horizon = schedule.episodes;
    else horizon = Math.max(t, Math.min((2 * this.logTerm * variance) / (this.unitTarget * this.unitTarget), schedule.maxEpisodes ?? Infinity));
    return Math.sqrt((2 * this.logTerm) / (variance * horizon));
  }

  private step(x: number): void {
    const bet = this.nextBet();
    this.remember(x, bet);
    const t = this.count;
    this.sum += x;
    const mean = (0.5 + this.sum) / (t + 1);
    this.squaredDeviations += (x - mean) * (x - mean);

    const { grid, capLow, capHigh, productLow, productHigh } = this;
    const from = this.lowIndex + 1;
    const to = this.highIndex;
    for (let j = from; j < to; j++) {
      const d = x - grid[j];
      const up = bet < capLow[j] ? bet : capLow[j];
      const down = bet < capHigh[j] ? bet : capHigh[j];
      productLow[j] *= 1 + up * d;
      productHigh[j] *= 1 - down * d;
    }
    if (t % FOLD === 0) this.fold(from, to);

    while (this.lowIndex + 1 < this.highIndex && this.currentLog(this.lowIndex + 1, 1) >= this.thresholdLow) this.lowIndex++;
    while (this.highIndex - 1 > this.lowIndex && this.currentLog(this.highIndex - 1, -1) >= this.thresholdHigh) this.highIndex--;
    if (this.lowIndex >= 0) this.low = Math.max(this.low, this.grid[this.lowIndex]);
    if (this.highIndex < this.gridSize) this.high = Math.min(this.high, this.grid[this.highIndex]);
    if (this.highIndex - this.lowIndex - 1 < this.gridSize / 2 && this.high - this.low > 1e-12) this.rebuild();
  }

  private currentLog(j: number, side: 1 | -1): number {
    return side === 1 ? this.logLow[j] + Math.log(this.productLow[j]) : this.logHigh[j] + Math.log(this.productHigh[j]);
  }

  private fold(from: number, to: number): void {
    const { logLow, logHigh, productLow, productHigh } = this;
    for (let j = from; j < to; j++) {
      logLow[j] += Math.log(productLow[j]);
      logHigh[j] += Math.log(productHigh[j]);
      productLow[j] = 1;
      productHigh[j] = 1;
    }
  }

  private remember(x: number, bet: number): void {
    if (this.count === this.xs.length) {
      const xs = new Float64Array(this.xs.length * 2);
      xs.set(this.xs);
      this.xs = xs;
      const bets = new Float64Array(this.bets.length * 2);
      bets.set(this.bets);
      this.bets = bets;
    }
    this.xs[this.count] = x;
    this.bets[this.count] = bet;
    this.count++;
  }

  private placeGrid(low: number, high: number): void {
    const size = this.gridSize;
    for (let j = 0; j < size; j++) {
      const m = j === size - 1 ? high : low + ((high - low) * j) / (size - 1);
      this.grid[j] = m;
      this.capLow[j] = m > 0 ? this.truncation / m : Infinity;
      this.capHigh[j] = m < 1 ? this.truncation / (1 - m) : Infinity;
    }
  }

  /**
   * Spreads a new grid over the current interval. Its end points are the excluded bounds (or
   * 0 and 1 while nothing is excluded there); every point strictly inside was never excluded,
   * so only its current capital is needed, recomputed from the kept history.
   */
  private rebuild(): void {
    const lowExcluded = this.lowIndex >= 0;
    const highExcluded = this.highIndex < this.gridSize;
    this.placeGrid(this.low, this.high);
    this.lowIndex = lowExcluded ? 0 : -1;
    this.highIndex = highExcluded ? this.gridSize - 1 : this.gridSize;
    const { grid, capLow, capHigh, xs, bets } = this;
    const n = this.count;
    for (let j = this.lowIndex + 1; j < this.highIndex; j++) {
      const m = grid[j];
      const cl = capLow[j];
      const ch = capHigh[j];
      let logLow = 0;
      let logHigh = 0;
      let productLow = 1;
      let productHigh = 1;
      for (let i = 0; i < n; i++) {
        const d = xs[i] - m;
        const bet = bets[i];
        productLow *= 1 + (bet < cl ? bet : cl) * d;
        productHigh *= 1 - (bet < ch ? bet : ch) * d;
        if ((i + 1) % FOLD === 0) {
          logLow += Math.log(productLow);
          logHigh += Math.log(productHigh);
          productLow = 1;
          productHigh = 1;
        }
      }
      this.logLow[j] = logLow;
      this.logHigh[j] = logHigh;
      this.productLow[j] = productLow;
      this.productHigh[j] = productHigh;
    }
    this.rebuildCount++;
  }
}
