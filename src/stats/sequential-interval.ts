import { InputError } from '../errors.js';
import type { ReturnBounds } from './return-bounds.js';

/**
 * What a run-until-target-error loop needs from an interval that it may stop on at a time it
 * chooses from the data. Methods labelled `-asymptotic` are not anytime-valid: their coverage
 * at a data-dependent stop holds only in a limit (small target error, many episodes).
 */
export type SequenceMethod = 'betting' | 'normal-mixture' | 'normal-mixture-asymptotic' | 'empirical-bernstein' | 'chow-robbins-asymptotic';

export interface SequentialInterval {
  method: SequenceMethod;
  level: number;
  /** Observations added so far. */
  episodes: number;
  low: number;
  high: number;
  /** (high − low)/2. */
  halfWidth: number;
  /** True when P(μ ∈ every interval of the run) ≥ level, so stopping on the data is safe. */
  anytimeValid: boolean;
}

/**
 * A running interval fed in batches of returns (or of paired differences). State is O(1);
 * `add` is deterministic and processes values one at a time in order, so the result does not
 * depend on how the values were split into batches.
 */
export interface RunningInterval {
  readonly episodes: number;
  add(values: Float64Array | number[]): void;
  interval(): SequentialInterval;
}

export function makeSequentialInterval(
  method: SequenceMethod,
  level: number,
  episodes: number,
  low: number,
  high: number,
  anytimeValid: boolean,
): SequentialInterval {
  return { method, level, episodes, low, high, halfWidth: (high - low) / 2, anytimeValid };
}

/**
 * Bounds for the paired difference first − second when first ∈ [a, b] and second ∈ [a', b']:
 * [a − b', b − a'], so the bounded-return sequences apply to differences too.
 */
export function differenceBounds(first: ReturnBounds, second: ReturnBounds): ReturnBounds {
  return [first[0] - second[1], first[1] - second[0]];
}

/** Refuses bounds that are not finite with LOW < HIGH. */
export function requireValidBounds(bounds: ReturnBounds): ReturnBounds {
  const [low, high] = bounds;
  if (!Number.isFinite(low) || !Number.isFinite(high) || !(low < high)) {
    throw new InputError('--bounds', `need finite LOW < HIGH (got ${low},${high})`);
  }
  return [low, high];
}

/**
 * Maps a return into [0, 1] by x = (g − a)/(b − a). A return outside [a, b] would void a bounded
 * method's guarantee, so it is an error; rounding in the last bits (as between dynamic
 * programming bounds and summed returns) is clamped.
 */
export function unitScaled(value: number, bounds: ReturnBounds, episode: number): number {
  const [a, b] = bounds;
  if (!Number.isFinite(value)) throw new InputError('returns', `episode ${episode} has a return that is not a finite number (${value})`);
  const slack = 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
  if (value < a - slack || value > b + slack) {
    throw new InputError('--bounds', `episode ${episode} has return ${value}, outside the bounds [${a}, ${b}]`);
  }
  return Math.min(1, Math.max(0, (value - a) / (b - a)));
}
