import { runEpisodes } from '../engine/pool.js';
import { prepareRollout } from '../engine/prepare.js';
import type { RolloutSpec } from '../engine/spec.js';
import type { EpisodeBlock } from '../engine/episode-block.js';
import { confidenceInterval, projectionTable, summarize, type CiMethod, type Interval, type ProjectionRow } from '../stats/index.js';
import { environmentFacts, type EnvironmentFacts } from './environment-facts.js';
import { ReturnsBuffer } from './returns-buffer.js';
import { RunningMoments } from './running-moments.js';

export interface EstimateRequest {
  readonly spec: RolloutSpec;
  readonly episodes: number;
  readonly workers: number;
  readonly method: CiMethod;
  readonly level: number;
  /** Return bounds given by the user (`--bounds`); they replace the environment's. */
  readonly bounds: [number, number] | null;
  /** A half-width the user wants projected (`--target-error`). */
  readonly targetError: number | null;
  readonly onProgress?: (progress: EstimateProgress) => void;
  readonly onBlock?: (block: EpisodeBlock) => void;
  readonly signal?: AbortSignal;
}

export interface EstimateProgress {
  readonly done: number;
  readonly total: number;
  readonly seconds: number;
  readonly mean: number;
  /** A normal-approximation half-width at the run's level, for display only. */
  readonly halfWidth: number;
}

/** The figures of one estimate; the JSON output is built from this. */
export interface EstimateResult {
  readonly facts: EnvironmentFacts;
  readonly seed: number;
  readonly start: string | null;
  readonly episodes: number;
  readonly requestedEpisodes: number;
  readonly mean: number;
  readonly std: number;
  readonly stderr: number;
  readonly min: number;
  readonly max: number;
  readonly ci: Interval;
  readonly bounds: [number, number] | null;
  readonly boundsSource: 'user' | 'environment' | null;
  readonly projection: ProjectionRow[];
  readonly meanLength: number;
  readonly longestEpisode: number;
  readonly episodesAtHorizon: number;
  readonly steps: number;
  readonly seconds: number;
  readonly workers: number;
  readonly interrupted: boolean;
}

/**
 * Runs the episodes of a spec and computes every figure of the report from the returns in
 * episode order, so the result is the same whatever the number of workers.
 */
export async function runEstimate(request: EstimateRequest): Promise<EstimateResult> {
  const { spec } = request;
  const prepared = await prepareRollout(spec);
  const facts = environmentFacts(prepared.env, prepared.policy, prepared.startIndex);
  const bounds = request.bounds ?? facts.returnBounds;
  const boundsSource = request.bounds ? 'user' : facts.returnBounds ? 'environment' : null;
  const buffer = new ReturnsBuffer(request.episodes, facts.horizon);
  const moments = new RunningMoments();
  const started = performance.now();
  const outcome = await runEpisodes(spec, {
    first: 0,
    count: request.episodes,
    workers: request.workers,
    signal: request.signal,
    onBlock: (block) => {
      buffer.append(block.returns, block.lengths);
      moments.addAll(block.returns);
      request.onBlock?.(block);
      request.onProgress?.({
        done: buffer.count,
        total: request.episodes,
        seconds: (performance.now() - started) / 1000,
        mean: moments.mean,
        halfWidth: moments.halfWidth(request.level),
      });
    },
  });
  const returns = buffer.view();
  const summary = summarize(returns);
  const ci = confidenceInterval(returns, summary, { method: request.method, level: request.level, bounds, seed: spec.seed });
  const episodesPerSecond = outcome.seconds > 0 ? outcome.episodes / outcome.seconds : null;
  const targets = request.targetError !== null ? [request.targetError] : undefined;
  const projection = projectionTable({
    method: request.method,
    summary,
    level: request.level,
    currentHalfWidth: ci.halfWidth,
    bounds,
    targets,
    episodesPerSecond,
  });
  return {
    facts,
    seed: spec.seed,
    start: spec.start,
    episodes: summary.n,
    requestedEpisodes: request.episodes,
    mean: summary.mean,
    std: summary.std,
    stderr: summary.stderr,
    min: summary.min,
    max: summary.max,
    ci,
    bounds,
    boundsSource,
    projection,
    meanLength: buffer.count > 0 ? buffer.lengthSum / buffer.count : 0,
    longestEpisode: buffer.longest,
    episodesAtHorizon: buffer.atHorizon,
    steps: outcome.steps,
    seconds: outcome.seconds,
    workers: request.workers,
    interrupted: buffer.count < request.episodes,
  };
}
