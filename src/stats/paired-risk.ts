import { eventHappens, type EventSpec } from '../options/risk-options.js';
import { requireLevel } from './interval.js';
import { sortedQuantile } from './sample-quantile.js';
import { tailMeanEstimate } from './tail-mean.js';

/** A difference first − second of a risk figure between two policies run on the same episodes. */
export interface RiskDifference {
  readonly estimate: number;
  /** Percentile interval of a paired bootstrap: approximate. */
  readonly low: number;
  readonly high: number;
}

export interface PairedRiskDifferences {
  readonly tail: number;
  readonly tailMean: RiskDifference;
  readonly events: readonly ({ readonly event: string } & RiskDifference)[];
  readonly resamples: number;
}

/** Resamples of the paired bootstrap: fewer for long runs, so it costs about 2·10⁸ weight draws at most. */
export function pairedRiskResamples(n: number): number {
  return Math.max(200, Math.min(1000, Math.floor(2e8 / Math.max(1, n))));
}

/** Poisson(1) from a uniform by inversion: P(k) = e⁻¹/k!. */
function poissonOne(u: number): number {
  let k = 0;
  let p = Math.exp(-1);
  let cdf = p;
  while (u > cdf && k < 20) {
    k++;
    p /= k;
    cdf += p;
  }
  return k;
}

/** A uniform in [0, 1) from (seed, resample, episode): a 32-bit integer hash (the MurmurHash3 finaliser), so weights need no stored stream. */
function hashUniform(seed: number, r: number, i: number): number {
  let h = (seed ^ Math.imul(r + 1, 0x9e3779b1) ^ Math.imul(i + 1, 0x85ebca77)) >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return (h >>> 0) / 4294967296;
}

/** CVaR_α of a weighted sample, walking the ascending order until α of the total weight. */
function weightedTailMean(values: Float64Array, order: Uint32Array, weights: Float64Array, total: number, tail: number): number {
  const mass = tail * total;
  let taken = 0;
  let sum = 0;
  for (let k = 0; k < order.length && taken < mass; k++) {
    const i = order[k];
    const take = Math.min(weights[i], mass - taken);
    sum += take * values[i];
    taken += take;
  }
  return sum / mass;
}

/**
 * Differences of the lower-tail mean and of event probabilities between two policies whose
 * returns are paired episode by episode (common random numbers), with percentile intervals from
 * a Poisson bootstrap of the pairs: each pair gets a Poisson(1) weight, the same for both
 * policies, which keeps the pairing (Hanley & MacGibbon 2006, "Creating non-parametric bootstrap
 * samples using Poisson frequencies", Computer Methods and Programs in Biomedicine 83:57–62;
 * from memory). Approximate, like every bootstrap, and short of its level when the tail holds
 * few episodes.
 */
export function pairedRiskDifferences(
  first: Float64Array,
  second: Float64Array,
  options: {
    tail: number;
    events: readonly EventSpec[];
    level: number;
    seed: number;
    resamples?: number;
    /** Per event, whether it happened in each episode of each policy; absent: a return event, told from the returns. */
    indicators?: readonly (readonly [Uint8Array, Uint8Array] | null)[];
  },
): PairedRiskDifferences {
  requireLevel(options.level);
  const n = Math.min(first.length, second.length);
  const a = first.subarray(0, n);
  const b = second.subarray(0, n);
  const orderOf = (x: Float64Array) => Uint32Array.from({ length: n }, (_, i) => i).sort((i, j) => x[i] - x[j] || i - j);
  const orderA = orderOf(a);
  const orderB = orderOf(b);
  const indicator = options.events.map((event, e) => {
    const diff = new Int8Array(n);
    const given = options.indicators?.[e];
    if (given) for (let i = 0; i < n; i++) diff[i] = given[0][i] - given[1][i];
    else for (let i = 0; i < n; i++) diff[i] = (eventHappens(event, a[i]) ? 1 : 0) - (eventHappens(event, b[i]) ? 1 : 0);
    return diff;
  });
  const tailEstimate = tailMeanEstimate(Float64Array.from(a).sort(), options.tail) - tailMeanEstimate(Float64Array.from(b).sort(), options.tail);
  const eventEstimates = indicator.map((diff) => diff.reduce((s, d) => s + d, 0) / n);
  const resamples = options.resamples ?? pairedRiskResamples(n);
  const tails = new Float64Array(resamples);
  const events = indicator.map(() => new Float64Array(resamples));
  const weights = new Float64Array(n);
  for (let r = 0; r < resamples; r++) {
    let total = 0;
    for (let i = 0; i < n; i++) {
      weights[i] = poissonOne(hashUniform(options.seed, r, i));
      total += weights[i];
    }
    if (total === 0) total = 1;
    tails[r] = weightedTailMean(a, orderA, weights, total, options.tail) - weightedTailMean(b, orderB, weights, total, options.tail);
    indicator.forEach((diff, e) => {
      let s = 0;
      for (let i = 0; i < n; i++) if (diff[i] !== 0) s += weights[i] * diff[i];
      events[e][r] = s / total;
    });
  }
  const alpha = 1 - options.level;
  const interval = (draws: Float64Array, estimate: number): RiskDifference => {
    draws.sort();
    return { estimate, low: sortedQuantile(draws, alpha / 2), high: sortedQuantile(draws, 1 - alpha / 2) };
  };
  return {
    tail: options.tail,
    tailMean: interval(tails, tailEstimate),
    events: options.events.map((event, e) => ({ event: event.text, ...interval(events[e], eventEstimates[e]) })),
    resamples,
  };
}
