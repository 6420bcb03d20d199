import { riskJson } from './risk-report.js';
import { exactBeside } from './exact-beside.js';
import type { ComparisonResult } from '../evaluate/compare.js';
import { groupsJson } from './group-json.js';

/**
 * The `compare --json` object. `policies` and `differences` (with a, b indices into
 * `policies`, differences a − b) are a contract that scripts rely on: add keys, never rename.
 */
export function compareJson(
  result: ComparisonResult,
  labels: { env: string; policies: readonly string[] },
  version: string,
  runId: string | null = null,
  /** The stored member run of each policy, when the comparison was stored. */
  memberIds: readonly string[] | null = null,
) {
  const { comparison } = result;
  const holm = comparison.pairs.length > 1;
  return {
    run_id: runId,
    env: labels.env,
    seed: result.request.seed,
    start: result.request.start,
    noise: result.request.noise,
    episodes: result.episodes,
    level: result.request.level,
    policies: result.estimates.map((estimate, p) => ({
      name: labels.policies[p],
      run_id: memberIds?.[p] ?? null,
      mean: estimate.mean,
      std: estimate.std,
      ci: { low: estimate.ci.low, high: estimate.ci.high, method: estimate.ci.method, level: estimate.ci.level },
      episodes: estimate.episodes,
      exact_value: exactBeside(estimate)?.value ?? null,
      exact_inside: exactBeside(estimate)?.inside ?? null,
      rank: comparison.policies[p].rank,
      mean_length: estimate.meanLength,
      iqm: comparison.policies[p].interquartileMean
        ? {
            estimate: comparison.policies[p].interquartileMean!.estimate,
            low: comparison.policies[p].interquartileMean!.interval.low,
            high: comparison.policies[p].interquartileMean!.interval.high,
            method: 'stratified-bootstrap',
          }
        : null,
      risk: riskJson(estimate.risk),
    })),
    differences: comparison.pairs.map((pair, q) => ({
      a: pair.first,
      b: pair.second,
      mean: pair.meanDifference,
      low: result.differenceIntervals[q].low,
      high: result.differenceIntervals[q].high,
      method: result.differenceIntervals[q].method,
      anytime_valid: result.differenceIntervals[q].anytimeValid ?? false,
      p_value: pair.pValue,
      adjusted_p_value: pair.adjustedPValue,
      correlation: pair.correlation,
      variance_reduction: pair.varianceReduction,
      probability_of_improvement: {
        estimate: pair.probabilityOfImprovement.estimate,
        low: pair.probabilityOfImprovement.interval.low,
        high: pair.probabilityOfImprovement.interval.high,
      },
      risk: result.riskDifferences
        ? {
            method: 'paired-poisson-bootstrap',
            approximate: true,
            resamples: result.riskDifferences[q].resamples,
            tail: result.riskDifferences[q].tail,
            tail_mean: result.riskDifferences[q].tailMean,
            events: result.riskDifferences[q].events,
          }
        : null,
    })),
    ranking: [...comparison.policies].sort((x, y) => x.rank - y.rank || x.policy - y.policy).map((p) => p.policy),
    p_value_adjustment: holm ? 'holm' : 'none',
    ...groupsJson(result.groups ?? null),
    target_error: result.target?.error ?? null,
    target_reached: result.target ? result.target.reached : null,
    max_episodes: result.target?.maxEpisodes ?? null,
    seconds: result.seconds,
    sampling_seconds: result.samplingSeconds,
    analysis_seconds: result.analysisSeconds,
    workers: result.request.workers,
    interrupted: result.interrupted,
    warnings: result.warnings,
    reckon_version: version,
  };
}
