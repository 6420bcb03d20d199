/**
 * Where to cut episodes. Cutting after H rewards changes the expected discounted return
 * by at most γ^H·R/(1−γ), R = max |reward| (geometric tail; docs/methods.md §2). When a file gives
 * no horizon we choose the smallest H that keeps this bound within the truncation
 * tolerance ε: H ≥ ln(R/(ε(1−γ)))/ln(1/γ), the ε-horizon time of Kearns, Mansour & Ng
 * (2002), also Kearns & Singh (2002) (from memory).
 */
import { InputError } from '../errors.js';
import { formatNumber } from './describe-value.js';

/** Default truncation tolerance ε when a definition gives none. */
export const DEFAULT_TRUNCATION_TOLERANCE = 1e-4;

/** A derived horizon above this is almost surely a discount too close to 1; ask for one instead. */
export const MAX_DERIVED_HORIZON = 100_000_000;

export interface ResolvedHorizon {
  readonly horizon: number;
  readonly horizonDerived: boolean;
}

/** γ^H·R/(1−γ): the largest change truncation after H rewards can make; null when γ = 1 (no geometric tail). */
export function truncationBound(discount: number, horizon: number, maxAbsReward: number): number | null {
  if (discount >= 1) return null;
  return (Math.pow(discount, horizon) * maxAbsReward) / (1 - discount);
}

/** Smallest integer H ≥ 1 with γ^H·R/(1−γ) ≤ ε (R = 0 gives 1). Requires γ < 1. */
export function horizonForTolerance(discount: number, maxAbsReward: number, tolerance: number): number {
  if (!(maxAbsReward > 0)) return 1;
  const within = (h: number) => (truncationBound(discount, h, maxAbsReward) as number) <= tolerance;
  // The closed form rounds (ln γ loses precision near 1), so take it as a guess and
  // binary-search the exact smallest H; the bound falls as H grows.
  const guess = Math.ceil(Math.log(maxAbsReward / (tolerance * (1 - discount))) / Math.log(1 / discount));
  if (!(guess <= MAX_DERIVED_HORIZON)) return guess; // the caller refuses it
  let high = Math.max(1, guess);
  while (!within(high)) high *= 2;
  let low = 1;
  while (low < high) {
    const mid = Math.floor((low + high) / 2);
    if (within(mid)) high = mid;
    else low = mid + 1;
  }
  return low;
}

/**
 * The horizon to use: the given one, else (γ < 1) the smallest one meeting the tolerance.
 * `where` labels the error when γ = 1 and none is given.
 */
export function resolveHorizon(
  discount: number,
  horizon: number | undefined,
  maxAbsReward: number,
  tolerance: number,
  where: string,
): ResolvedHorizon {
  if (horizon !== undefined) return { horizon, horizonDerived: false };
  if (discount >= 1) throw new InputError(where, 'horizon is required when discount is 1');
  const derived = horizonForTolerance(discount, maxAbsReward, tolerance);
  if (!(derived <= MAX_DERIVED_HORIZON)) {
    throw new InputError(
      where,
      `discount ${formatNumber(discount)} needs a horizon of ${derived} to meet truncation_tolerance ${formatNumber(tolerance)}; give "horizon" or a larger "truncation_tolerance"`,
    );
  }
  return { horizon: derived, horizonDerived: true };
}
