import type { EventSpec } from '../options/risk-options.js';
import { eventSequenceSettings, makeEventSequence } from './event-sequence.js';
import type { TargetEventFigure } from './figures.js';
import type { RiskRequest } from '../options/risk-options.js';
import type { RiskFigures } from './risk.js';
import { runEpisodes, startCodeWorkers } from '../engine/pool.js';
import type { EarlyWorkers } from '../engine/early-workers.js';
import { prepareForRun, type ReadyRun } from './prepare-for-run.js';
import type { RolloutSpec } from '../engine/spec.js';
import type { NoiseMode } from '../engine/noise.js';
import { blockPrefix, type EpisodeBlock } from '../engine/episode-block.js';
import { resolveEvent } from './episode-events.js';
import type { CiMethod, ProjectionRow } from '../stats/index.js';
import { computeFigures, checkIntervalPossible, type AnalysisProgress, type ReportedInterval, type TargetOutcome } from './figures.js';
import type { EnvironmentFacts } from './environment-facts.js';
import { ReturnsBuffer } from './returns-buffer.js';
import { RunningMoments } from './running-moments.js';
import { InputError, StoppedEarly } from '../errors.js';
import { chooseSequence, isSequenceMethod, makeRunningInterval, targetReached, type SequenceChoice, type SequenceSettings } from './sequence.js';

/** A fixed-sample interval method, or a sequence for a run that stops at a target error. */
export type IntervalChoice = CiMethod | SequenceChoice;

export interface EstimateRequest {
  readonly spec: RolloutSpec;
  /** Risk figures to compute from the returns (`--risk`); none when absent. */
  readonly risk?: RiskRequest | null;
  /** Stop when this event's probability is known to ±targetError, instead of the mean (`--target-event`). */
  readonly targetEvent?: EventSpec | null;
  /** Episodes the run should have when done (counting `prior`); with `targetError`, the cap. */
  readonly episodes: number;
  readonly workers: number;
  /** Interval method; null lets a target-error run choose its default sequence. */
  readonly method: IntervalChoice | null;
  readonly level: number;
  /** Return bounds given by the user (`--bounds`); they replace the environment's. */
  readonly bounds: [number, number] | null;
  /**
   * Run until the interval's half-width is at most this (or `episodes` is reached), with an
   * interval that stays valid at that data-dependent stop. Null runs exactly `episodes`.
   */
  readonly targetError: number | null;
  /** The user's sub-Gaussian scale for the normal-mixture sequence (`--sigma`). */
  readonly sigma?: number | null;
  readonly onProgress?: (progress: EstimateProgress) => void;
  /** Called with every block in episode order, with its steps and the run's seconds so far. */
  readonly onBlock?: (block: EpisodeBlock, steps: number, seconds: number) => void;
  /** Called once the environment is built and the interval settled, before any episode runs. */
  readonly onFacts?: (facts: EnvironmentFacts, method: IntervalChoice) => void;
  /** Index of the run's first episode (a shard starts later); default 0. */
  readonly first?: number;
  /** Episodes already run and stored (a resumed run), from `first` on. */
  readonly prior?: { returns: Float64Array; lengths: Uint32Array; finals?: Int32Array | null };
  readonly priorSeconds?: number;
  readonly signal?: AbortSignal;
  /** Told how far a slow figure has got, once the episodes are done. */
  readonly onAnalysis?: AnalysisProgress;
  /** Seconds one call into a plug-in may take before the run fails (default 10). */
  readonly stepTimeout?: number;
}

export interface EstimateProgress {
  readonly done: number;
  readonly total: number;
  readonly seconds: number;
  readonly mean: number;
  /** The current half-width: the sequence's in a target-error run, else a normal approximation. */
  readonly halfWidth: number;
  readonly targetError: number | null;
}

/** The figures of one estimate; the JSON output is built from this. */
export interface EstimateResult {
  readonly facts: EnvironmentFacts;
  readonly seed: number;
  readonly start: string | null;
  /** How the draws were keyed: by step or by state visit (engine/noise.ts). */
  readonly noise: NoiseMode;
  readonly episodes: number;
  readonly requestedEpisodes: number;
  readonly mean: number;
  readonly std: number;
  readonly stderr: number;
  readonly min: number;
  readonly max: number;
  readonly ci: ReportedInterval;
  readonly bounds: [number, number] | null;
  readonly boundsSource: 'user' | 'environment' | null;
  readonly projection: ProjectionRow[];
  readonly meanLength: number;
  readonly longestEpisode: number;
  readonly episodesAtHorizon: number;
  readonly steps: number;
  /** Sampling plus analysis. */
  readonly seconds: number;
  /** Running the episodes. */
  readonly samplingSeconds: number;
  /** Computing the figures from the returns (interval, projection). */
  readonly analysisSeconds: number;
  readonly workers: number;
  readonly interrupted: boolean;
  /** Set for a run until a target error. */
  readonly target: TargetOutcome | null;
  /** Advice about the interval method at this sample size; printed under the estimate. */
  readonly warnings: readonly string[];
  /** Quantiles, tail mean and event probabilities, when asked for (`--risk`). */
  readonly risk: RiskFigures | null;
  /** Set when the run stopped on an event's probability (`--target-event`). */
  readonly targetEvent: TargetEventFigure | null;
}

/**
 * Runs the episodes of a spec and computes every figure of the report from the returns in
 * episode order, so the result is the same whatever the number of workers, and a resumed run
 * (given its stored episodes as `prior`) ends with the figures of an uninterrupted one.
 *
 * A target-error run checks its sequence after every episode, in episode order, and stops at
 * the first episode where the half-width is within the target: the stopping point, and so the
 * result, depends only on the returns, never on block sizes or workers. Episodes that were
 * already running past that point are discarded.
 */
export async function runEstimate(request: EstimateRequest): Promise<EstimateResult> {
  // A code environment's worker threads load while this thread prepares the spec.
  const early = startCodeWorkers(request.spec, request.workers, Math.max(0, request.episodes - (request.prior?.returns.length ?? 0)));
  try {
    return await estimateWith(request, early);
  } finally {
    early?.close();
  }
}

async function estimateWith(request: EstimateRequest, early: EarlyWorkers | null): Promise<EstimateResult> {
  const { spec } = request;
  let ready: ReadyRun;
  try {
    ready = await prepareForRun(spec, request.signal, early);
  } catch (e) {
    if (e instanceof StoppedEarly) throw new StoppedEarly(request.prior?.returns.length ?? 0, request.episodes, true);
    throw e;
  }
  const { prepared, facts } = ready;
  const bounds = request.bounds ?? facts.returnBounds;
  const sigma = request.sigma ?? null;
  let method: IntervalChoice;
  let sequenceSettings: SequenceSettings | null = null;
  const targetEvent = request.targetEvent ?? null;
  if (targetEvent && request.targetError === null) throw new InputError('--target-event', 'needs --target-error E: the half-width to reach on the probability, e.g. --target-error 0.001');
  if (targetEvent) {
    // The run stops on the event's sequence; the mean gets an interval valid at any stop when bounds allow.
    sequenceSettings = eventSequenceSettings(request.level, request.targetError!, request.episodes);
    method = request.method ?? (bounds ? 'betting' : 't');
  } else if (request.targetError !== null) {
    const choice = chooseSequence(request.method, bounds, sigma);
    sequenceSettings = { method: choice, level: request.level, bounds, sigma, targetError: request.targetError, plannedEpisodes: request.episodes };
    method = choice;
  } else {
    const fixed = request.method ?? 't';
    if (isSequenceMethod(fixed) && fixed !== 'betting') {
      throw new InputError('--ci', `${fixed} is for runs that stop at a target error: add --target-error E (or choose t, normal, bootstrap, bootstrap-percentile, hoeffding, bernstein or betting)`);
    }
    if (fixed === 'betting' && !bounds) throw new InputError('--ci betting', 'needs return bounds: give --bounds LOW,HIGH (none are known for this environment)');
    if (fixed !== 'betting') checkIntervalPossible(fixed, bounds, request.level);
    method = fixed;
  }
  // A misspelt terminal, or a terminal event on a module environment, fails before any episode runs.
  for (const event of request.risk?.events ?? []) resolveEvent(event, facts);
  request.onFacts?.(facts, method);

  // A fixed-size run knows its size; a target-error run's cap may be far more than it will use.
  const buffer = new ReturnsBuffer(request.targetError === null ? request.episodes : Math.min(request.episodes, 1 << 16), facts.horizon);
  const moments = new RunningMoments();
  const eventSequence = targetEvent ? makeEventSequence(targetEvent, sequenceSettings!, facts) : null;
  const sequence = eventSequence ?? (sequenceSettings ? makeRunningInterval(sequenceSettings) : null);
  const single = new Float64Array(1);
  let reached = false;
  const offer = (returns: Float64Array, lengths: Uint32Array, finals: Int32Array | null): number => {
    // How many of these episodes the run keeps: all, unless the target is reached among them.
    if (!sequence || !sequenceSettings) return returns.length;
    if (eventSequence && targetEvent!.subject === 'terminal' && !finals) {
      throw new InputError('--target-event', `"${targetEvent!.text}": the stored episodes of this run do not record where they ended, so it cannot continue on a terminal event`);
    }
    for (let i = 0; i < returns.length; i++) {
      if (eventSequence) eventSequence.addEpisode(returns[i], lengths[i], finals ? finals[i] : Number.NaN);
      else {
        single[0] = returns[i];
        sequence.add(single);
      }
      if (targetReached(sequence, sequenceSettings)) {
        reached = true;
        return i + 1;
      }
    }
    return returns.length;
  };
  const halfWidthNow = () => (sequence ? sequence.interval().halfWidth : moments.halfWidth(request.level));

  const first = request.first ?? 0;
  if (request.prior && request.prior.returns.length > 0) {
    const finals = request.prior.finals ?? null;
    const keep = offer(request.prior.returns, request.prior.lengths, finals);
    buffer.append(request.prior.returns.subarray(0, keep), request.prior.lengths.subarray(0, keep), finals?.subarray(0, keep) ?? null);
    moments.addAll(request.prior.returns.subarray(0, keep));
  }
  const priorSeconds = request.priorSeconds ?? 0;
  const started = performance.now();
  const stop = new AbortController();
  const signal = request.signal ? AbortSignal.any([request.signal, stop.signal]) : stop.signal;
  let outcomeSeconds = 0;
  if (!reached && buffer.count < request.episodes) {
    const outcome = await runEpisodes(spec, {
      prepared: prepared ?? undefined,
      early,
      first: first + buffer.count,
      count: request.episodes - buffer.count,
      workers: request.workers,
      stepTimeout: request.stepTimeout,
      signal,
      // Every block is copied into the buffer (and the store, when stored) before onBlock returns.
      reuseBlocks: true,
      onBlock: (block) => {
        if (reached) return;
        const keep = offer(block.returns, block.lengths, block.finals);
        const kept = blockPrefix(block, keep);
        let steps = 0;
        for (let i = 0; i < kept.count; i++) steps += kept.lengths[i];
        buffer.append(kept.returns, kept.lengths, kept.finals);
        moments.addAll(kept.returns);
        request.onBlock?.(kept, steps, priorSeconds + (performance.now() - started) / 1000);
        request.onProgress?.({
          done: buffer.count,
          total: request.episodes,
          seconds: (performance.now() - started) / 1000,
          mean: moments.mean,
          halfWidth: halfWidthNow(),
          targetError: request.targetError,
        });
        if (reached) stop.abort();
      },
    });
    outcomeSeconds = outcome.seconds;
  }
  // Stopped before any figure can be computed: kept as an interrupted run, not failed.
  if (buffer.count < 2 && request.signal?.aborted && !reached) throw new StoppedEarly(buffer.count, request.episodes);
  const timing = { steps: buffer.lengthSum, seconds: priorSeconds + outcomeSeconds, workers: request.workers };
  return computeFigures(
    buffer,
    facts,
    { method, level: request.level, bounds: request.bounds, targetError: request.targetError, sigma, seed: spec.seed, start: spec.start, noise: spec.noise, onAnalysis: request.onAnalysis, risk: request.risk ?? null,
      ...(targetEvent ? { targetError: null, plannedEpisodes: false as const, targetEvent: { event: targetEvent, error: request.targetError!, live: sequence } } : {}) },
    timing,
    request.episodes,
    targetEvent ? null : sequence,
  );
}
