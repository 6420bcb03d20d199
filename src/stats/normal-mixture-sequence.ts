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
 * Normal-mixture confidence sequence (Robbins 1970, "Statistical methods related to the law of
 * the iterated logarithm", Ann. Math. Statist. 41:1397–1409; Howard, Ramdas, McAuliffe &
 * Sekhon 2021, "Time-uniform, nonparametric, nonasymptotic confidence sequences", Ann. Statist.
 * 49:1055–1080; docs/methods.md §6.3). If X_i − μ is σ-sub-Gaussian, then with probability ≥ 1 − α,
 * for every t at once, |X̄_t − μ| ≤ (σ/t)√((t + ρ) ln((t + ρ)/(ρα²))). Returns in [a, b] are
 * (b − a)/2-sub-Gaussian (Hoeffding's lemma). ρ > 0 sets the time where the boundary is
 * tightest.
 */
export function normalMixtureHalfWidth(t: number, sigma: number, level: number, rho: number): number {
  const alpha = 1 - level;
  return (sigma / t) * Math.sqrt((t + rho) * Math.log((t + rho) / (rho * alpha * alpha)));
}

/**
 * ρ/t* that makes the half-width smallest at t = t*: setting the derivative of
 * (1 + r) ln((1 + r)/(r α²)) to zero gives ln((1 + r)/(r α²)) = 1/r, whose left minus right
 * side increases in r, so bisection finds the root (≈ 0.12177 for α = 0.05; derivation in
 * docs/methods.md §6.3, recomputed by scripts/methods/normal_mixture.py).
 */
export function tunedRhoRatio(level: number): number {
  requireLevel(level);
  const alpha = 1 - level;
  const excess = (r: number) => Math.log((1 + r) / (r * alpha * alpha)) - 1 / r;
  let low = 1e-12;
  let high = 1e6;
  for (let i = 0; i < 200; i++) {
    const middle = Math.sqrt(low * high);
    if (excess(middle) < 0) low = middle;
    else high = middle;
  }
  return Math.sqrt(low * high);
}

/** ρ for a run expected to end near `targetEpisodes`. */
export function tunedRho(targetEpisodes: number, level: number): number {
  if (!(targetEpisodes > 0) || !Number.isFinite(targetEpisodes)) {
    throw new RangeError(`tunedRho: target episodes must be positive (got ${targetEpisodes})`);
  }
  return tunedRhoRatio(level) * targetEpisodes;
}

/** Where σ came from; only a user's σ or bounds give an anytime-valid sequence. */
export type SigmaSource = 'given' | 'bounds' | 'estimated';

export interface NormalMixtureOptions {
  /** Two-sided confidence level, e.g. 0.95. */
  level: number;
  /** Sub-Gaussian scale of one return, from the user. Takes precedence over `bounds`. */
  sigma?: number;
  /** Limits of every return: σ = (b − a)/2, values are checked against them and the interval is clipped to them. */
  bounds?: ReturnBounds | null;
  /** Mixture parameter ρ; or give `targetEpisodes` to tune it ({@link tunedRho}). */
  rho?: number;
  targetEpisodes?: number;
}

/**
 * The normal-mixture sequence, updated in batches. With neither σ nor bounds, the running
 * sample standard deviation is plugged in for σ: the result is then only asymptotically valid
 * (Waudby-Smith et al. 2024, Ann. Statist.; from memory) and is labelled
 * `normal-mixture-asymptotic`; it collapses when the first returns happen to be equal.
 * No running intersection is kept; the interval is clipped to the bounds when they are known
 * (docs/methods.md §6.3).
 */
export class NormalMixtureSequence implements RunningInterval {
  readonly level: number;
  readonly rho: number;
  readonly sigmaSource: SigmaSource;
  private readonly sigma: number;
  private readonly bounds: ReturnBounds | null;
  private count = 0;
  private mean = 0;
  private squaredDeviations = 0;

  constructor(options: NormalMixtureOptions) {
    requireLevel(options.level);
    this.level = options.level;
    this.bounds = options.bounds == null ? null : requireValidBounds(options.bounds);
    if (options.sigma !== undefined) {
      if (!(options.sigma > 0) || !Number.isFinite(options.sigma)) {
        throw new InputError('--sigma', `must be a positive number (got ${options.sigma})`);
      }
      this.sigma = options.sigma;
      this.sigmaSource = 'given';
    } else if (this.bounds) {
      this.sigma = (this.bounds[1] - this.bounds[0]) / 2;
      this.sigmaSource = 'bounds';
    } else {
      this.sigma = Number.NaN;
      this.sigmaSource = 'estimated';
    }
    if (options.rho !== undefined) {
      if (!(options.rho > 0) || !Number.isFinite(options.rho)) throw new RangeError(`NormalMixtureSequence: rho must be positive (got ${options.rho})`);
      this.rho = options.rho;
    } else if (options.targetEpisodes !== undefined) {
      this.rho = tunedRho(options.targetEpisodes, options.level);
    } else {
      throw new RangeError('NormalMixtureSequence: give rho or targetEpisodes');
    }
  }

  get episodes(): number {
    return this.count;
  }

  add(values: Float64Array | number[]): void {
    for (let i = 0; i < values.length; i++) {
      const x = values[i];
      if (this.bounds) unitScaled(x, this.bounds, this.count);
      else if (!Number.isFinite(x)) throw new InputError('returns', `episode ${this.count} has a return that is not a finite number (${x})`);
      // Welford (1962, Technometrics 4:419–420): O(1) state, same result for any batching.
      this.count++;
      const delta = x - this.mean;
      this.mean += delta / this.count;
      this.squaredDeviations += delta * (x - this.mean);
    }
  }

  interval(): SequentialInterval {
    const method = this.sigmaSource === 'estimated' ? 'normal-mixture-asymptotic' : 'normal-mixture';
    const t = this.count;
    const sigma = this.sigmaSource === 'estimated' ? (t >= 2 ? Math.sqrt(this.squaredDeviations / (t - 1)) : Number.NaN) : this.sigma;
    let low = -Infinity;
    let high = Infinity;
    if (t >= 1 && !Number.isNaN(sigma)) {
      const halfWidth = normalMixtureHalfWidth(t, sigma, this.level, this.rho);
      low = this.mean - halfWidth;
      high = this.mean + halfWidth;
    }
    if (this.bounds) {
      low = Math.max(low, this.bounds[0]);
      high = Math.min(high, this.bounds[1]);
    }
    return makeSequentialInterval(method, this.level, t, low, high, method === 'normal-mixture');
  }
}

/** How many episodes a normal-mixture run needs, and the ρ to run it with. */
export interface NormalMixturePlan {
  episodes: number;
  rho: number;
}

/**
 * The smallest t whose normal-mixture half-width at scale σ is ≤ ε. Without ρ, ρ is tuned to
 * the answer itself (ρ = r*·t), and then the half-width is (σ/√t)·√((1 + r*) ln((1 + r*)/(r* α²))),
 * so t = (σ/ε)²(1 + r*) ln((1 + r*)/(r* α²)) in closed form. With ρ given, the half-width is
 * decreasing in t (for α < 0.6), and doubling then bisection finds t. σ is the pilot's: as
 * with any projection, the run may stop earlier or later (docs/methods.md §5).
 */
export function episodesNeededNormalMixture(request: { epsilon: number; sigma: number; level: number; rho?: number }): NormalMixturePlan {
  const { epsilon, sigma, level } = request;
  requireLevel(level);
  if (!(epsilon > 0) || !Number.isFinite(epsilon)) throw new InputError('target half-width', `must be a positive number (got ${epsilon})`);
  if (!(sigma >= 0) || !Number.isFinite(sigma)) throw new RangeError(`episodesNeededNormalMixture: sigma must be ≥ 0 (got ${sigma})`);
  if (request.rho === undefined) {
    const ratio = tunedRhoRatio(level);
    const alpha = 1 - level;
    const exact = (sigma / epsilon) ** 2 * (1 + ratio) * Math.log((1 + ratio) / (ratio * alpha * alpha));
    const episodes = Math.max(1, Math.ceil(exact));
    return { episodes, rho: ratio * episodes };
  }
  const rho = request.rho;
  const meets = (t: number) => normalMixtureHalfWidth(t, sigma, level, rho) <= epsilon;
  let failing = 0;
  let passing = 1;
  while (!meets(passing)) {
    failing = passing;
    passing *= 2;
    if (passing > Number.MAX_SAFE_INTEGER) return { episodes: Infinity, rho };
  }
  while (passing - failing > 1) {
    const middle = Math.floor((failing + passing) / 2);
    if (meets(middle)) passing = middle;
    else failing = middle;
  }
  return { episodes: passing, rho };
}
