import { InputError } from '../errors.js';
import { requireLevel } from './interval.js';
import type { ReturnBounds } from './return-bounds.js';
import {
  makeSequentialInterval,
  requireValidBounds,
  unitScaled,
  type RunningInterval,
  type SequentialInterval,
} from './sequential-interval.js';

/**
 * Predictable plug-in empirical-Bernstein confidence sequence (Waudby-Smith & Ramdas 2024,
 * "Estimating means of bounded random variables by betting", JRSS-B 86(1):1–27; arXiv
 * 2010.09686; docs/methods.md §6.2), for returns in known bounds [a, b], rescaled to x ∈ [0, 1]:
 *   μ̂_t = (1/2 + Σ_{i≤t} x_i)/(t + 1),  σ̂²_t = (1/4 + Σ_{i≤t} (x_i − μ̂_i)²)/(t + 1),
 *   λ_t = min(√(2 ln(2/α)/(σ̂²_{t−1} t ln(1 + t))), c),  v_t = 4(x_t − μ̂_{t−1})²,
 *   ψ_E(λ) = (−ln(1 − λ) − λ)/4,
 *   C_t = Σλ_i x_i/Σλ_i ± (ln(2/α) + Σ v_i ψ_E(λ_i))/Σλ_i,
 * intersected with [0, 1] and with every earlier C_t (valid because the coverage holds for all
 * t at once). λ_t uses only earlier data (predictable), which is what makes it anytime-valid.
 * Unlike the normal mixture it adapts to a small variance without assuming one.
 */
export interface EmpiricalBernsteinOptions {
  /** Two-sided confidence level, e.g. 0.95. */
  level: number;
  /** Limits [a, b] of every value (for paired differences see `differenceBounds`). */
  bounds: ReturnBounds;
  /** Cap c on λ_t, in (0, 1): the paper suggests 1/2 (default) or 3/4 (from memory). */
  truncation?: number;
  /** Keep the running intersection (default true); false gives the raw C_t, for checks. */
  intersect?: boolean;
}

export class EmpiricalBernsteinSequence implements RunningInterval {
  readonly level: number;
  private readonly bounds: ReturnBounds;
  private readonly truncation: number;
  private readonly intersect: boolean;
  private readonly logTerm: number;
  private count = 0;
  private sum = 0;
  private squaredDeviations = 0;
  private sumLambda = 0;
  private sumLambdaX = 0;
  private sumPenalty = 0;
  private low = 0;
  private high = 1;

  constructor(options: EmpiricalBernsteinOptions) {
    requireLevel(options.level);
    if (options.bounds == null) throw new InputError('--bounds', 'the empirical-Bernstein sequence needs return bounds LOW,HIGH');
    this.level = options.level;
    this.bounds = requireValidBounds(options.bounds);
    this.truncation = options.truncation ?? 0.5;
    if (!(this.truncation > 0 && this.truncation < 1)) {
      throw new RangeError(`EmpiricalBernsteinSequence: truncation must be in (0, 1) (got ${this.truncation})`);
    }
    this.intersect = options.intersect ?? true;
    this.logTerm = Math.log(2 / (1 - options.level));
  }

  get episodes(): number {
    return this.count;
  }

  add(values: Float64Array | number[]): void {
    for (let i = 0; i < values.length; i++) this.addOne(unitScaled(values[i], this.bounds, this.count));
  }

  private addOne(x: number): void {
    const previousMean = (0.5 + this.sum) / (this.count + 1);
    const previousVariance = (0.25 + this.squaredDeviations) / (this.count + 1);
    const t = this.count + 1;
    const lambda = Math.min(Math.sqrt((2 * this.logTerm) / (previousVariance * t * Math.log(1 + t))), this.truncation);
    const v = 4 * (x - previousMean) ** 2;
    this.sumLambda += lambda;
    this.sumLambdaX += lambda * x;
    this.sumPenalty += v * psiE(lambda);
    this.count = t;
    this.sum += x;
    const mean = (0.5 + this.sum) / (t + 1);
    this.squaredDeviations += (x - mean) ** 2;

    const [low, high] = this.rawUnitInterval();
    if (this.intersect) {
      this.low = Math.max(this.low, low);
      this.high = Math.min(this.high, high);
    } else {
      this.low = low;
      this.high = high;
    }
  }

  /** C_t in [0, 1] units, before any intersection. */
  private rawUnitInterval(): [number, number] {
    const centre = this.sumLambdaX / this.sumLambda;
    const margin = (this.logTerm + this.sumPenalty) / this.sumLambda;
    return [centre - margin, centre + margin];
  }

  interval(): SequentialInterval {
    const [a, b] = this.bounds;
    let low = this.low;
    let high = this.high;
    // An empty intersection can only happen on the probability-α event that μ left some C_t;
    // it is reported as the point where the two ends crossed.
    if (low > high) low = high = (low + high) / 2;
    return makeSequentialInterval('empirical-bernstein', this.level, this.count, a + (b - a) * low, a + (b - a) * high, true);
  }
}

/** ψ_E(λ) = (−ln(1 − λ) − λ)/4; log1p keeps its digits for small λ. */
export function psiE(lambda: number): number {
  return (-Math.log1p(-lambda) - lambda) / 4;
}

/**
 * Episodes an empirical-Bernstein run needs to reach half-width ε, by simulating the
 * deterministic path of the half-width with the pilot's variance σ² plugged in: Σ_{i≤t}(x_i −
 * μ̂_i)² ≈ (t)·σ², so σ̂²_{t−1} = (1/4 + (t − 1)σ²)/t, and v_i ≈ 4σ² (the deviation of μ̂ from μ
 * is ignored); the half-width is then (ln(2/α) + 4σ² Σψ_E(λ_i))/Σλ_i. Clipping to [0, 1] and
 * intersections are left out, so the real run tends to stop no later than this says, up to the
 * noise in σ̂. O(t) steps up to 4096 episodes, then blocks of about t/4096 episodes summed by
 * their midpoints, so about 4096·ln(t/4096) steps; O(1) memory. Gives Infinity past 10⁹ episodes.
 */
export function episodesNeededEmpiricalBernstein(request: {
  epsilon: number;
  variance: number;
  bounds: ReturnBounds;
  level: number;
  truncation?: number;
}): number {
  const { epsilon, variance, level } = request;
  requireLevel(level);
  const [a, b] = requireValidBounds(request.bounds);
  if (!(epsilon > 0) || !Number.isFinite(epsilon)) throw new InputError('target half-width', `must be a positive number (got ${epsilon})`);
  if (!(variance >= 0) || !Number.isFinite(variance)) throw new RangeError(`episodesNeededEmpiricalBernstein: variance must be ≥ 0 (got ${variance})`);
  const range = b - a;
  const unitVariance = Math.min(0.25, variance / (range * range));
  const unitEpsilon = epsilon / range;
  const truncation = request.truncation ?? 0.5;
  const logTerm = Math.log(2 / (1 - level));
  const lambdaAt = (t: number) => {
    const previousVariance = (0.25 + (t - 1) * unitVariance) / t;
    return Math.min(Math.sqrt((2 * logTerm) / (previousVariance * t * Math.log(1 + t))), truncation);
  };
  const reached = (sumLambda: number, sumPenalty: number) => (logTerm + sumPenalty) / sumLambda <= unitEpsilon;
  let sumLambda = 0;
  let sumPenalty = 0;
  let t = 0;
  while (t < MAX_PLANNED_EPISODES) {
    // λ_t changes by a factor of about 1 + k/(2t) over k steps, so past a few thousand
    // episodes a block of k ≈ t/4096 is summed by its midpoint (relative error ~ (k/t)²/24,
    // below 1e-8) and only the block where the target is met is walked episode by episode.
    const k = Math.min(Math.max(1, Math.floor(t / 4096)), MAX_PLANNED_EPISODES - t);
    let blockLambda: number;
    let blockPenalty: number;
    if (k === 1) {
      blockLambda = lambdaAt(t + 1);
      blockPenalty = 4 * unitVariance * psiE(blockLambda);
    } else {
      const middle = lambdaAt(t + (k + 1) / 2);
      blockLambda = k * middle;
      blockPenalty = k * 4 * unitVariance * psiE(middle);
    }
    if (reached(sumLambda + blockLambda, sumPenalty + blockPenalty)) {
      if (k === 1) return t + 1;
      for (let i = t + 1; i <= t + k; i++) {
        const lambda = lambdaAt(i);
        sumLambda += lambda;
        sumPenalty += 4 * unitVariance * psiE(lambda);
        if (reached(sumLambda, sumPenalty)) return i;
      }
      return t + k;
    }
    sumLambda += blockLambda;
    sumPenalty += blockPenalty;
    t += k;
  }
  return Infinity;
}

const MAX_PLANNED_EPISODES = 1e9;
