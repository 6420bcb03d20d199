/**
 * The two-sided betting interval on the weighted returns when the largest weight is known:
 * X_i = W_i(G_i − G_min)/(G_max − G_min) lies in [0, W_max], so the hedged-capital betting
 * sequence for a bounded mean (stats/betting-sequence.ts; Waudby-Smith & Ramdas 2024, Theorem 3)
 * applies, with bets tuned to the log's size. Valid at any n; wide when W_max is large, which
 * it is for long horizons.
 */
import { BettingSequence } from '../stats/betting-sequence.js';

export function twoSidedBettingInterval(x: Float64Array, largestWeight: number, level: number): [number, number] | null {
  if (!(largestWeight > 0) || !Number.isFinite(largestWeight) || x.length < 2) return null;
  const sequence = new BettingSequence({ level, bounds: [0, largestWeight], schedule: { kind: 'planned', episodes: x.length } });
  sequence.add(x);
  const interval = sequence.refined();
  return [interval.low, interval.high];
}
