import { runEpisodes } from '../engine/pool.js';
import { prepareRollout } from '../engine/prepare.js';
import type { RolloutSpec } from '../engine/spec.js';
import type { EpisodeBlock } from '../engine/episode-block.js';
import { confidenceInterval, summarize, type CiMethod, type Interval, type ProjectionRow } from '../stats/index.js';
import { computeFigures } from './figures.js';
import { environmentFacts, type EnvironmentFacts } from './environment-facts.js';
import { ReturnsBuffer } from './returns-buffer.js';
import { RunningMoments } from './running-moments.js';

export interface EstimateRequest {
  readonly spec: RolloutSpec;
  /** Episodes the run should have when done (counting `prior`). */
  readonly episodes: number;
  readonly workers: number;
  readonly method: CiMethod;
  readonly level: number;
  /** Return bounds given by the user (`--bounds`); they replace the environment's. */
  readonly bounds: [number, number] | null;
  /** A half-width the user wants projected (`--target-error`). */
  readonly targetError: number | null;
  readonly onProgress?: (progress: EstimateProgress) => void;
  /** Called with every block in episode order, with its steps and the run's seconds so far. */
  readonly onBlock?: (block: EpisodeBlock, steps: number, seconds: number) => void;
  /** Called once the environment is built, before any episode runs. */
  readonly onFacts?: (facts: EnvironmentFacts) => void;
  /** Index of the run's first episode (a shard starts later); default 0. */
  readonly first?: number;
  /** Episodes already run and stored (a resumed run), from `first` on. */
  readonly prior?: { returns: Float64Array; lengths: Uint32Array };
  readonly priorSeconds?: number;
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
 * episode order, so the result is the same whatever the number of workers, and a resumed run
 * (given its stored episodes as `prior`) ends with the figures of an uninterrupted one.
 */
export async function runEstimate(request: EstimateRequest): Promise<EstimateResult> {
  const { spec } = request;
  const prepared = await prepareRollout(spec);
  const facts = environmentFacts(prepared.env, prepared.policy, prepared.startIndex);
  const bounds = request.bounds ?? facts.returnBounds;
  // Check now, not after the run, that the interval can be computed (e.g. bounds are known).
  if ((request.method === 'hoeffding' || request.method === 'bernstein') && bounds === null) {
    confidenceInterval(new Float64Array(2), summarize(new Float64Array(2)), { method: request.method, level: request.level, bounds });
  }
  request.onFacts?.(facts);
  const buffer = new ReturnsBuffer(request.episodes, facts.horizon);
  const moments = new RunningMoments();
  const first = request.first ?? 0;
  const prior = request.prior;
  let priorSteps = 0;
  if (prior && prior.returns.length > 0) {
    buffer.append(prior.returns, prior.lengths);
    moments.addAll(prior.returns);
    for (const length of prior.lengths) priorSteps += length;
  }
  const priorSeconds = request.priorSeconds ?? 0;
  const started = performance.now();
  const outcome = await runEpisodes(spec, {
    first: first + buffer.count,
    count: request.episodes - buffer.count,
    workers: request.workers,
    signal: request.signal,
    onBlock: (block, steps) => {
      buffer.append(block.returns, block.lengths);
      moments.addAll(block.returns);
      request.onBlock?.(block, steps, priorSeconds + (performance.now() - started) / 1000);
      request.onProgress?.({
        done: buffer.count,
        total: request.episodes,
        seconds: (performance.now() - started) / 1000,
        mean: moments.mean,
        halfWidth: moments.halfWidth(request.level),
      });
    },
  });
  const timing = { steps: priorSteps + outcome.steps, seconds: priorSeconds + outcome.seconds, workers: request.workers };
  return computeFigures(
    buffer,
    facts,
    { method: request.method, level: request.level, bounds: request.bounds, targetError: request.targetError, seed: spec.seed, start: spec.start },
    timing,
    request.episodes,
  );
}
