import { confidenceInterval, projectionTable, summarize, type CiMethod, type ProjectionRow } from '../stats/index.js';
import type { EnvironmentFacts } from './environment-facts.js';
import type { EstimateResult, IntervalChoice } from './estimate.js';
import type { ReturnsBuffer } from './returns-buffer.js';
import { isSequenceMethod, makeRunningInterval, sequenceEpisodesNeeded, sequenceInterval, targetReached, type SequenceSettings } from './sequence.js';

export interface FigureSettings {
  readonly method: IntervalChoice;
  readonly level: number;
  /** Bounds given by the user; they replace the environment's. */
  readonly bounds: [number, number] | null;
  readonly targetError: number | null;
  readonly sigma: number | null;
  readonly seed: number;
  readonly start: string | null;
}

export interface RunTiming {
  readonly steps: number;
  readonly seconds: number;
  readonly workers: number;
}

/** An interval as reported: a fixed-sample one, or a confidence sequence's at the stop. */
export interface ReportedInterval {
  readonly method: string;
  readonly level: number;
  readonly low: number;
  readonly high: number;
  readonly halfWidth: number;
  /** True when the interval stays valid however the run decided to stop. */
  readonly anytimeValid?: boolean;
}

/** How a run until a target error ended. */
export interface TargetOutcome {
  readonly error: number;
  readonly reached: boolean;
  readonly maxEpisodes: number;
}

/** Fails before any episode runs when the interval cannot be computed (e.g. bounds unknown). */
export function checkIntervalPossible(method: CiMethod, bounds: [number, number] | null, level: number): void {
  if (method === 'hoeffding' || method === 'bernstein') {
    confidenceInterval(new Float64Array(2), summarize(new Float64Array(2)), { method, level, bounds });
  }
}

/**
 * Every figure of a report from the returns in episode order: the same code serves a fresh
 * run, a resumed one and a re-analysis of stored returns, so they agree to the bit. For a
 * sequence method the returns are fed to a new sequence in order, which reproduces the
 * interval the run stopped on.
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
  const episodesPerSecond = timing.seconds > 0 ? buffer.count / timing.seconds : null;
  let ci: ReportedInterval;
  let projection: ProjectionRow[];
  let target: TargetOutcome | null = null;
  if (isSequenceMethod(settings.method)) {
    const sequenceSettings: SequenceSettings = {
      method: settings.method,
      level: settings.level,
      bounds,
      sigma: settings.sigma,
      targetError: settings.targetError ?? Number.NaN,
    };
    const sequence = makeRunningInterval(sequenceSettings);
    sequence.add(returns);
    const reached = settings.targetError !== null && targetReached(sequence, sequenceSettings);
    ci = sequenceInterval(sequence, sequenceSettings, reached, summary.mean);
    target = settings.targetError === null ? null : { error: settings.targetError, reached, maxEpisodes: requestedEpisodes };
    const targets = settings.targetError !== null && !reached ? [settings.targetError] : [ci.halfWidth / 2, ci.halfWidth / 5, ci.halfWidth / 10];
    projection = targets
      .filter((t) => t > 0 && Number.isFinite(t))
      .map((halfWidth) => {
        const needed = sequenceEpisodesNeeded(sequenceSettings, summary, halfWidth);
        const more = Math.max(0, needed - summary.n);
        return { half_width: halfWidth, episodes_needed: needed, more_episodes: more, seconds: episodesPerSecond ? more / episodesPerSecond : null };
      });
  } else {
    const interval = confidenceInterval(returns, summary, { method: settings.method, level: settings.level, bounds, seed: settings.seed });
    ci = { ...interval, anytimeValid: false };
    projection = projectionTable({
      method: settings.method,
      summary,
      level: settings.level,
      currentHalfWidth: ci.halfWidth,
      bounds,
      targets: settings.targetError !== null ? [settings.targetError] : undefined,
      episodesPerSecond,
    });
  }
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
    interrupted: target ? !target.reached && buffer.count < requestedEpisodes : buffer.count < requestedEpisodes,
    target,
  };
}
