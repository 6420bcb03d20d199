import { riskJson } from './risk-report.js';
import { exactBeside } from './exact-beside.js';
import type { EstimateResult } from '../evaluate/estimate.js';

/**
 * The `estimate --json` object. Keys are a contract that scripts rely on: add, never rename.
 * `env` and `policy` are the labels (paths) of the definitions.
 */
export function estimateJson(result: EstimateResult, labels: { env: string; policy: string }, version: string, runId: string | null = null) {
  const facts = result.facts;
  return {
    run_id: runId,
    env: labels.env,
    policy: labels.policy,
    episodes: result.episodes,
    mean: result.mean,
    std: result.std,
    stderr: result.stderr,
    min: result.min,
    max: result.max,
    ci: {
      method: result.ci.method,
      level: result.ci.level,
      low: result.ci.low,
      high: result.ci.high,
      half_width: result.ci.halfWidth,
      anytime_valid: result.ci.anytimeValid ?? false,
    },
    exact_value: exactBeside(result)?.value ?? null,
    exact_inside: exactBeside(result)?.inside ?? null,
    target_error: result.target?.error ?? null,
    target_reached: result.target ? result.target.reached : null,
    max_episodes: result.target?.maxEpisodes ?? null,
    projection: result.projection,
    seed: result.seed,
    start: result.start,
    noise: result.noise,
    discount: facts.discount,
    horizon: facts.horizon,
    horizon_derived: facts.horizonDerived,
    truncation_bound: facts.truncationBound,
    return_bounds: result.bounds ? { low: result.bounds[0], high: result.bounds[1], source: result.boundsSource } : null,
    mean_length: result.meanLength,
    longest_episode: result.longestEpisode,
    episodes_at_horizon: result.episodesAtHorizon,
    steps: result.steps,
    seconds: result.seconds,
    sampling_seconds: result.samplingSeconds,
    analysis_seconds: result.analysisSeconds,
    steps_per_second: result.samplingSeconds > 0 ? result.steps / result.samplingSeconds : null,
    episodes_per_second: result.samplingSeconds > 0 ? result.episodes / result.samplingSeconds : null,
    workers: result.workers,
    interrupted: result.interrupted,
    warnings: result.warnings,
    risk: riskJson(result.risk),
    target_event: result.targetEvent
      ? {
          event: result.targetEvent.event,
          count: result.targetEvent.count,
          estimate: result.targetEvent.estimate,
          method: result.targetEvent.interval.method,
          low: result.targetEvent.interval.low,
          high: result.targetEvent.interval.high,
          half_width: result.targetEvent.interval.halfWidth,
          anytime_valid: result.targetEvent.interval.anytimeValid ?? false,
        }
      : null,
    reckon_version: version,
  };
}
