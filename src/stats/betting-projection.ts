import { InputError } from '../errors.js';
import type { BetSchedule } from './betting-sequence.js';
import { requireLevel } from './interval.js';
import type { ReturnBounds } from './return-bounds.js';
import { requireValidBounds } from './sequential-interval.js';

const MAX_PLANNED_EPISODES = 1e9;
/** Episodes whose bets are taken one by one; beyond, chunks of 1% of t share one bet. */
const EXACT_STEPS = 2000;
/**
 * The expected-path model below ignores that the running intersection keeps the best endpoint
 * seen so far; simulated stops come at 0.83 of the modelled count (docs/methods.md §7.1, "planning a
 * betting run", recomputed by scripts/betting-projection-factor.mjs).
 */
export const RUNNING_INTERSECTION_FACTOR = 0.83;

export interface BettingProjectionRequest {
  readonly epsilon: number;
  readonly mean: number;
  readonly variance: number;
  readonly bounds: ReturnBounds;
  readonly level: number;
  readonly schedule: BetSchedule;
  readonly truncation?: number;
}

/**
 * Episodes a betting sequence needs before its half-width reaches ε, for returns of this mean
 * and variance. Along the bets the schedule would place (with the plug-in variance's expected
 * path (1/4 + (t − 1)σ²)/t), each side's distance d from the mean at which the expected
 * log-capital, to second order Σ λ_i d − λ_i²(σ² + d²)/2 with λ_i truncated at that candidate,
 * reaches its threshold ln(2/α); the run stops when the two distances add up to 2ε. For bets
 * aimed at ε that is about 2 ln(2/α)σ²/ε², 1.92 times the fixed-n normal count (zσ/ε)² at
 * α = 0.05 (docs/methods.md §6.6), scaled by {@link RUNNING_INTERSECTION_FACTOR}.
 */
export function episodesNeededBetting(request: BettingProjectionRequest): number {
  const modelled = modelledEpisodes(request);
  return Number.isFinite(modelled) ? Math.max(2, Math.ceil(RUNNING_INTERSECTION_FACTOR * modelled)) : Infinity;
}

/** The expected-path count alone, without the running-intersection factor. */
export function modelledEpisodes(request: BettingProjectionRequest): number {
  const { epsilon, variance, level, schedule } = request;
  requireLevel(level);
  const [a, b] = requireValidBounds(request.bounds);
  if (!(epsilon > 0) || !Number.isFinite(epsilon)) throw new InputError('target half-width', `must be a positive number (got ${epsilon})`);
  if (!(variance >= 0) || !Number.isFinite(variance)) throw new RangeError(`episodesNeededBetting: variance must be ≥ 0 (got ${variance})`);
  const range = b - a;
  const s2 = Math.min(0.25, variance / (range * range));
  const mu = Math.min(1, Math.max(0, (request.mean - a) / range));
  const e = epsilon / range;
  if (e >= 0.5) return 1;
  const c = request.truncation ?? defaultTruncation(schedule);
  const logTerm = Math.log(2 / (1 - level));
  const unitTarget = schedule.kind === 'target' ? schedule.halfWidth / range : Number.NaN;
  const betAt = (t: number) => {
    const previousVariance = (0.25 + (t - 1) * s2) / t;
    let horizon: number;
    if (schedule.kind === 'anytime') horizon = t * Math.log1p(t);
    else if (schedule.kind === 'planned') horizon = schedule.episodes;
    else horizon = Math.max(t, (2 * logTerm * previousVariance) / (unitTarget * unitTarget));
    return Math.sqrt((2 * logTerm) / (previousVariance * horizon));
  };

  // Bets 1..T as (value, weight) pairs: one by one at first, then in chunks of 1% of t.
  const bets: number[] = [];
  const weights: number[] = [];
  let placed = 0;
  const placeUpTo = (T: number) => {
    while (placed < T) {
      const chunk = placed < EXACT_STEPS ? 1 : Math.min(T - placed, Math.ceil(placed / 100));
      bets.push(betAt(placed + 1 + (chunk - 1) / 2));
      weights.push(chunk);
      placed += chunk;
    }
  };
  /** Smallest distance d ≤ room with expected log-capital ≥ the threshold after the first `entries` bets. */
  const distance = (entries: number, room: number): number => {
    if (room <= 0) return 0;
    const gain = (d: number) => {
      const cap = c / Math.max(room - d, 1e-300);
      let sum = 0;
      for (let k = 0; k < entries; k++) {
        const bet = bets[k] < cap ? bets[k] : cap;
        sum += weights[k] * (bet * d - (bet * bet * (s2 + d * d)) / 2);
      }
      return sum;
    };
    if (gain(room) < logTerm) return Infinity;
    let low = 0;
    let high = room;
    for (let k = 0; k < 40; k++) {
      const mid = (low + high) / 2;
      if (gain(mid) >= logTerm) high = mid;
      else low = mid;
    }
    return high;
  };
  // Candidates below the mean are truncated at c/m = c/(μ − d), above it at c/(1 − μ − d).
  const reached = (T: number): boolean => {
    placeUpTo(T);
    const entries = bets.length;
    return distance(entries, mu) + distance(entries, 1 - mu) <= 2 * e;
  };
  let high = 1;
  while (!reached(high)) {
    if (high >= MAX_PLANNED_EPISODES) return Infinity;
    high *= 2;
  }
  let low = Math.floor(high / 2);
  while (high - low > Math.max(1, high * 1e-3)) {
    const mid = Math.floor((low + high) / 2);
    // the bets up to mid are a prefix of those up to high only when chunks line up; rebuild
    bets.length = 0;
    weights.length = 0;
    placed = 0;
    if (reached(mid)) high = mid;
    else low = mid;
  }
  return high;
}

/** The cap c of a schedule: 3/4 for bets aimed at a target (they are moderate already), else the paper's 1/2. */
export function defaultTruncation(schedule: BetSchedule): number {
  return schedule.kind === 'target' ? 0.75 : 0.5;
}
