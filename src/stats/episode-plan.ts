import { episodesNeededBetting } from './betting-projection.js';
import { episodesNeededEmpiricalBernstein } from './empirical-bernstein-sequence.js';
import { episodesNeededNormalMixture, type NormalMixturePlan, type SigmaSource } from './normal-mixture-sequence.js';
import { episodesNeeded } from './projection.js';
import type { ReturnBounds } from './return-bounds.js';
import type { ReturnSummary } from './summary.js';

export interface EpisodePlanRequest {
  /** Summary of the pilot episodes. */
  pilot: ReturnSummary;
  /** Target half-width ε. */
  epsilon: number;
  /** Two-sided confidence level, e.g. 0.95. */
  level: number;
  /** Known return bounds; enable the Hoeffding and empirical-Bernstein rows. */
  bounds?: ReturnBounds | null;
  /** The user's σ for the normal mixture (else (b − a)/2 from bounds, else the pilot's s). */
  sigma?: number;
}

export interface EpisodePlan {
  /** Fixed-n t interval: the t projection of projection.ts (valid only if n is fixed in advance). */
  fixedT: number;
  /** Normal-mixture sequence: episodes, the ρ to run with, and the σ used. `estimated` means the run would be asymptotic. */
  normalMixture: NormalMixturePlan & { sigma: number; sigmaSource: SigmaSource };
  /** Empirical-Bernstein sequence at the pilot's variance (deterministic path); null without bounds. */
  empiricalBernstein: number | null;
  /** Betting sequence with bets aimed at ε, at the pilot's mean and variance; null without bounds. */
  betting: number | null;
  /** Hoeffding's fixed n (Hoeffding 1963, Thm 2); null without bounds. */
  hoeffding: number | null;
}

/**
 * Episodes each way of running needs to reach half-width ε, from a pilot (docs/methods.md §7.1):
 * a fixed-n t run, the two confidence sequences of a run that stops on the data, and Hoeffding.
 * The normal mixture's σ is the one the run will use (the user's, or (b − a)/2 from bounds),
 * so its answer does not depend on the pilot unless neither is known.
 */
export function planEpisodes(request: EpisodePlanRequest): EpisodePlan {
  const { pilot, epsilon, level } = request;
  const bounds = request.bounds ?? null;
  const fixedT = episodesNeeded('t', pilot, epsilon, level);
  const sigmaSource: SigmaSource = request.sigma !== undefined ? 'given' : bounds ? 'bounds' : 'estimated';
  const sigma = request.sigma ?? (bounds ? (bounds[1] - bounds[0]) / 2 : pilot.std);
  const normalMixture = { ...episodesNeededNormalMixture({ epsilon, sigma, level }), sigma, sigmaSource };
  return {
    fixedT,
    normalMixture,
    empiricalBernstein: bounds ? episodesNeededEmpiricalBernstein({ epsilon, variance: pilot.variance, bounds, level }) : null,
    betting: bounds
      ? episodesNeededBetting({ epsilon, mean: pilot.mean, variance: pilot.variance, bounds, level, schedule: { kind: 'target', halfWidth: epsilon } })
      : null,
    hoeffding: bounds ? episodesNeeded('hoeffding', pilot, epsilon, level, bounds) : null,
  };
}
