import type { EstimateResult } from '../evaluate/estimate.js';

/**
 * The exact value a finite run estimates, and whether its interval holds it: printed beside
 * the estimate by every report, as a check of the sampler (and of the interval) against the
 * truth. Null for code environments, policies without probabilities, and runs stored before
 * the value was kept.
 */
export function exactBeside(result: Pick<EstimateResult, 'facts' | 'ci'>): { value: number; inside: boolean } | null {
  const value = result.facts.exactValue;
  if (value === null || value === undefined) return null;
  return { value, inside: result.ci.low <= value && value <= result.ci.high };
}
