import { InputError } from '../errors.js';
import type { CiMethod } from './interval.js';
import type { ReturnSummary } from './summary.js';

/** Known limits [a, b] that every return lies in: the premise of Hoeffding and Bernstein bounds. */
export type ReturnBounds = [number, number];

/**
 * Checks the bounds a bounded-variable method relies on. A return outside them would void the
 * guarantee silently, so it is an error rather than a clip.
 */
export function requireBounds(
  method: CiMethod,
  bounds: ReturnBounds | null | undefined,
  summary: ReturnSummary,
): ReturnBounds {
  if (bounds == null) {
    throw new InputError('--ci ' + method, 'needs return bounds: give --bounds LOW,HIGH (none are known for this environment)');
  }
  const [low, high] = bounds;
  if (!Number.isFinite(low) || !Number.isFinite(high) || !(low < high)) {
    throw new InputError('--bounds', `need finite LOW < HIGH (got ${low},${high})`);
  }
  // Bounds computed by dynamic programming and returns summed along an episode may differ in
  // the last bits; only a real violation voids the guarantee.
  const slack = 1e-9 * Math.max(1, Math.abs(low), Math.abs(high));
  if (summary.min < low - slack || summary.max > high + slack) {
    throw new InputError(
      '--bounds',
      `observed returns span [${summary.min}, ${summary.max}], outside the bounds [${low}, ${high}]`,
    );
  }
  return [low, high];
}
