import { InputError } from '../errors.js';
import type { BetSchedule } from './betting-sequence.js';
import { requireLevel } from './interval.js';
import type { ReturnBounds } from './return-bounds.js';
import { requireValidBounds } from './sequential-interval.js';

const MAX_PLANNED_EPISODES = 1e9;
/** Episodes simulated one by one; beyond, chunks of 1% of t share one bet. */
const EXACT_STEPS = 20_000;

/**
 * Episodes a betting sequence needs before its half-width reaches ε, if the returns have this
 * mean and variance: the expected log-capital at the candidate means μ ∓ ε (second-order,
 * E log(1 + λ(x − m)) ≈ λ(μ − m) − λ²(σ² + (μ − m)²)/2) is accumulated along the bets the
 * schedule would place with the plug-in variance's expected path (0.25 + (t − 1)σ²)/t, until
 * both sides pass their threshold ln(2/α). For bets aimed at ε this gives about
 * 2 ln(2/α)σ²/ε², 1.92 times the fixed-n normal count (z σ/ε)² at α = 0.05 (docs/methods.md,
 * "Targeted bets").
 */
export function episodesNeededBetting(request: {
  epsilon: number;
  mean: number;
  variance: number;
  bounds: ReturnBounds;
  level: number;
  schedule: BetSchedule;
  truncation?: number;
}): number {
  const { epsilon, variance, level, schedule } = request;
  requireLevel(level);
  const [a, b] = requireValidBounds(request.bounds);
  if (!(epsilon > 0) || !Number.isFinite(epsilon)) throw new InputError('target half-width', `must be a positive number (got ${epsilon})`);
  if (!(variance >= 0) || !Number.isFinite(variance)) throw new RangeError(`episodesNeededBetting: variance must be ≥ 0 (got ${variance})`);
  const range = b - a;
  const unitVariance = Math.min(0.25, variance / (range * range));
  const unitMean = Math.min(1, Math.max(0, (request.mean - a) / range));
  const e = epsilon / range;
  if (e >= 0.5) return 1;
  const c = request.truncation ?? 0.5;
  const logTerm = Math.log(2 / (1 - level));
  const threshold = logTerm; // ln(1/(θα)) with θ = 1/2
  const lowM = unitMean - e;
  const highM = unitMean + e;
  // Below 0 or above 1 a side needs no evidence: that end of [0, 1] bounds the interval.
  const capLow = lowM > 0 ? c / lowM : Infinity;
  const capHigh = highM < 1 ? c / (1 - highM) : Infinity;
  const gain = (bet: number) => bet * e - (bet * bet * (unitVariance + e * e)) / 2;
  const unitTarget = schedule.kind === 'target' ? schedule.halfWidth / range : Number.NaN;
  const betAt = (t: number) => {
    const previousVariance = (0.25 + (t - 1) * unitVariance) / t;
    let horizon: number;
    if (schedule.kind === 'anytime') horizon = t * Math.log1p(t);
    else if (schedule.kind === 'planned') horizon = schedule.episodes;
    else horizon = Math.max(t, (2 * logTerm * previousVariance) / (unitTarget * unitTarget));
    return Math.sqrt((2 * logTerm) / (previousVariance * horizon));
  };
  let low = lowM <= 0 ? Infinity : 0;
  let high = highM >= 1 ? Infinity : 0;
  let t = 0;
  while (t < MAX_PLANNED_EPISODES) {
    const chunk = t < EXACT_STEPS ? 1 : Math.ceil(t / 100);
    const bet = betAt(t + 1 + (chunk - 1) / 2);
    low += chunk * gain(Math.min(bet, capLow));
    high += chunk * gain(Math.min(bet, capHigh));
    t += chunk;
    if (low >= threshold && high >= threshold) return t;
  }
  return Infinity;
}
