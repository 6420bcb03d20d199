import { EventIndicatorSequence, eventSequenceSettings, makeEventSequence } from './event-sequence.js';
import type { EventSpec } from '../options/risk-options.js';
import type { RiskRequest } from '../options/risk-options.js';
import { riskFigures } from './risk.js';
import { InputError } from '../errors.js';
import { confidenceInterval, projectionTable, summarize, type CiMethod, type ProjectionRow, type RunningInterval } from '../stats/index.js';
import type { EnvironmentFacts } from './environment-facts.js';
import type { NoiseMode } from '../engine/noise.js';
import type { EstimateResult, IntervalChoice } from './estimate.js';
import { intervalWarnings } from './interval-advice.js';
import type { ReturnsBuffer } from './returns-buffer.js';
import { isSequenceMethod, makeRunningInterval, sequenceEpisodesNeeded, sequenceInterval, targetReached, type SequenceSettings } from './sequence.js';

/** Told how far a slow figure has got (a bootstrap's resamples), so a terminal can show it. */
export type AnalysisProgress = (step: string, done: number, total: number) => void;

export interface FigureSettings {
  readonly method: IntervalChoice;
  readonly level: number;
  /** Bounds given by the user; they replace the environment's. */
  readonly bounds: [number, number] | null;
  readonly targetError: number | null;
  readonly sigma: number | null;
  readonly seed: number;
  readonly start: string | null;
  readonly onAnalysis?: AnalysisProgress;
  /** Risk figures to compute as well (`--risk`). */
  readonly risk?: RiskRequest | null;
  /**
   * The run stopped when the probability of this event was known to ±error (`--target-event`);
   * `live` is the event's sequence a fresh run already fed; a re-analysis gives the episodes'
   * lengths and final states instead, which length and terminal events are replayed from.
   */
  readonly targetEvent?: {
    readonly event: EventSpec;
    readonly error: number;
    readonly live?: RunningInterval | null;
    readonly episodes?: { readonly lengths: Uint32Array; readonly finals: Int32Array | null };
  } | null;
  /** False when a sequence is read without a planned size or cap (a comparison's members); default: the requested episodes. */
  readonly plannedEpisodes?: false;
  /** How the episodes' draws were keyed (engine/noise.ts). */
  readonly noise: NoiseMode;
}

export interface RunTiming {
  readonly steps: number;
  /** Seconds spent running the episodes (the sampling). */
  readonly seconds: number;
  readonly workers: number;
}

/**
 * The analysis time at `to` episodes from the time it took at `from`, as n log n grows (the
 * sorts; the resampling costs grow no faster). Used to tell what a projected run would cost in
 * all, not only in sampling.
 */
export function projectedAnalysisSeconds(seconds: number, from: number, to: number): number {
  if (!(seconds > 0) || from < 2 || to <= from) return Math.max(0, seconds);
  return (seconds * to * Math.log(to)) / (from * Math.log(from));
}

/** Below this, an analysis is timed again once compiled before its time is projected. */
const QUICK_ANALYSIS_SECONDS = 0.05;

/** Adds the analysis of the projected run to each projection row's time. */
function withAnalysis(rows: ProjectionRow[], analysisSeconds: number, episodes: number): ProjectionRow[] {
  return rows.map((row) =>
    row.seconds === null ? row : { ...row, seconds: row.seconds + projectedAnalysisSeconds(analysisSeconds, episodes, row.episodes_needed) },
  );
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

/** The probability of the event a run stopped on, with the confidence sequence it stopped on. */
export interface TargetEventFigure {
  readonly event: string;
  readonly count: number;
  readonly estimate: number;
  readonly interval: ReportedInterval;
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
 * interval the run stopped on; a fresh run passes the sequence it already fed with exactly
 * these returns in this order (`live`), which is the same state, to save the replay.
 */
export function computeFigures(
  buffer: ReturnsBuffer,
  facts: EnvironmentFacts,
  settings: FigureSettings,
  timing: RunTiming,
  requestedEpisodes: number,
  live: RunningInterval | null = null,
): EstimateResult {
  const analysisStarted = performance.now();
  const analysisSoFar = () => (performance.now() - analysisStarted) / 1000;
  const returns = buffer.view();
  const summary = summarize(returns);
  const bounds = settings.bounds ?? facts.returnBounds;
  const episodesPerSecond = timing.seconds > 0 ? buffer.count / timing.seconds : null;
  let ci: ReportedInterval;
  let projection: ProjectionRow[];
  let target: TargetOutcome | null = null;
  let targetEvent: TargetEventFigure | null = null;
  if (settings.targetEvent) {
    const { event, error } = settings.targetEvent;
    const eventSettings = eventSequenceSettings(settings.level, error, requestedEpisodes);
    const live = settings.targetEvent.live;
    const sequence = live instanceof EventIndicatorSequence && live.episodes === returns.length ? live : makeEventSequence(event, eventSettings, facts);
    if (sequence !== live) {
      const episodes = settings.targetEvent.episodes;
      if (event.subject === 'terminal' && !episodes?.finals) {
        throw new InputError(`P(${event.text})`, 'where this run\'s episodes ended was not recorded, so the sequence it stopped on cannot be replayed');
      }
      sequence.addEpisodes(returns, episodes?.lengths ?? null, episodes?.finals ?? null);
    }
    const reached = targetReached(sequence, eventSettings);
    const interval = sequenceInterval(sequence, eventSettings, reached, sequence.count / Math.max(1, returns.length));
    targetEvent = { event: event.text, count: sequence.count, estimate: sequence.count / Math.max(1, returns.length), interval: { ...interval } };
    target = { error, reached, maxEpisodes: requestedEpisodes };
  }
  if (isSequenceMethod(settings.method)) {
    const sequenceSettings: SequenceSettings = {
      method: settings.method,
      level: settings.level,
      bounds,
      sigma: settings.sigma,
      targetError: settings.targetError ?? Number.NaN,
      // A fixed-size betting run tunes its bets to its planned size.
      plannedEpisodes: settings.plannedEpisodes !== false ? requestedEpisodes : null,
    };
    // A fresh run hands over the sequence it fed while running; a re-analysis replays it.
    const sequence = live ?? makeRunningInterval(sequenceSettings);
    if (!live) sequence.add(returns);
    const reached = settings.targetError !== null && targetReached(sequence, sequenceSettings);
    ci = sequenceInterval(sequence, sequenceSettings, reached, summary.mean);
    if (!settings.targetEvent) target = settings.targetError === null ? null : { error: settings.targetError, reached, maxEpisodes: requestedEpisodes };
    const targets = settings.targetError !== null && !reached ? [settings.targetError] : [ci.halfWidth / 2, ci.halfWidth / 5, ci.halfWidth / 10];
    projection = targets
      .filter((t) => t > 0 && Number.isFinite(t))
      .map((halfWidth) => {
        const needed = sequenceEpisodesNeeded(sequenceSettings, summary, halfWidth);
        const more = Math.max(0, needed - summary.n);
        return { half_width: halfWidth, episodes_needed: needed, more_episodes: more, seconds: episodesPerSecond ? more / episodesPerSecond : null };
      });
    projection = withAnalysis(projection, analysisSoFar(), summary.n);
  } else {
    const onProgress = settings.onAnalysis ? (done: number, total: number) => settings.onAnalysis!(`${settings.method} interval`, done, total) : undefined;
    const request = { method: settings.method, level: settings.level, bounds, seed: settings.seed, onProgress };
    const interval = confidenceInterval(returns, summary, request);
    const firstAnalysis = analysisSoFar();
    // A quick analysis is mostly compiling its code, which a longer run pays no more of: its
    // cost per episode is read from a second, compiled pass (a few milliseconds at most).
    let perRunAnalysis = firstAnalysis;
    if (firstAnalysis < QUICK_ANALYSIS_SECONDS) {
      const again = performance.now();
      confidenceInterval(returns, summarize(returns), request);
      perRunAnalysis = (performance.now() - again) / 1000;
    }
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
    projection = withAnalysis(projection, perRunAnalysis, summary.n);
  }
  const risk = settings.risk ? riskFigures(buffer, settings.risk, { level: settings.level, bounds, seed: settings.seed, facts }) : null;
  const analysisSeconds = analysisSoFar();
  return {
    facts,
    seed: settings.seed,
    start: settings.start,
    noise: settings.noise,
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
    seconds: timing.seconds + analysisSeconds,
    samplingSeconds: timing.seconds,
    analysisSeconds,
    workers: timing.workers,
    interrupted: target ? !target.reached && buffer.count < requestedEpisodes : buffer.count < requestedEpisodes,
    target,
    warnings: [
      ...intervalWarnings(ci.method, summary.n, bounds !== null),
      ...(targetEvent && !ci.anytimeValid
        ? [`the run stopped when P(${targetEvent.event}) was narrow enough, and the mean's ${ci.method} interval ignores that; give return bounds for one that holds at any stop`]
        : []),
    ],
    risk,
    targetEvent,
  };
}
