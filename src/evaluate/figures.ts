import { confidenceInterval, projectionTable, summarize, type CiMethod } from '../stats/index.js';
import type { EnvironmentFacts } from './environment-facts.js';
import type { EstimateResult } from './estimate.js';
import type { ReturnsBuffer } from './returns-buffer.js';

export interface FigureSettings {
  readonly method: CiMethod;
  readonly level: number;
  /** Bounds given by the user; they replace the environment's. */
  readonly bounds: [number, number] | null;
  readonly targetError: number | null;
  readonly seed: number;
  readonly start: string | null;
}

export interface RunTiming {
  readonly steps: number;
  readonly seconds: number;
  readonly workers: number;
}

/**
 * Every figure of a report from the returns in episode order: the same code serves a fresh
 * run, a resumed one and a re-analysis of stored returns, so they agree to the bit.
 */
export function computeFigures(
  buffer: ReturnsBuffer,
  facts: EnvironmentFacts,
  settings: FigureSettings,
  timing: RunTiming,
  requestedEpisodes: number,
): EstimateResult {
  const returns = buffer.view();
  const summary = summarize(returns);
  const bounds = settings.bounds ?? facts.returnBounds;
  const ci = confidenceInterval(returns, summary, { method: settings.method, level: settings.level, bounds, seed: settings.seed });
  const episodesPerSecond = timing.seconds > 0 ? buffer.count / timing.seconds : null;
  const projection = projectionTable({
    method: settings.method,
    summary,
    level: settings.level,
    currentHalfWidth: ci.halfWidth,
    bounds,
    targets: settings.targetError !== null ? [settings.targetError] : undefined,
    episodesPerSecond,
  });
  return {
    facts,
    seed: settings.seed,
    start: settings.start,
    episodes: summary.n,
    requestedEpisodes,
    mean: summary.mean,
    std: summary.std,
    stderr: summary.stderr,
    min: summary.min,
    max: summary.max,
    ci,
    bounds,
    boundsSource: settings.bounds ? 'user' : facts.returnBounds ? 'environment' : null,
    projection,
    meanLength: buffer.count > 0 ? buffer.lengthSum / buffer.count : 0,
    longestEpisode: buffer.longest,
    episodesAtHorizon: buffer.atHorizon,
    steps: timing.steps,
    seconds: timing.seconds,
    workers: timing.workers,
    interrupted: buffer.count < requestedEpisodes,
  };
}
