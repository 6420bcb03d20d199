import { parseEvent, type RiskRequest } from '../options/risk-options.js';
import type { RolloutSpec } from '../engine/spec.js';
import { InputError, StoppedEarly } from '../errors.js';
import { definitionHash } from '../store/definition-hash.js';
import { definitionFiles, displayPath, firstChangedFile } from '../store/definition-files.js';
import { machineFacts } from '../store/machine.js';
import type { Db } from '../store/open.js';
import { appendChunk, claimRun, createRun, finishRun, keepHeartbeat, loadEpisodes, refuseIfLive, runKindPhrase, type RunRecord, type ShardInfo } from '../store/runs.js';
import { HEARTBEAT_SECONDS } from '../store/owner.js';
import type { IntervalChoice } from './estimate.js';
import type { EnvironmentFacts } from './environment-facts.js';
import { runEstimate, type EstimateProgress, type EstimateResult } from './estimate.js';
import { computeFigures, type AnalysisProgress } from './figures.js';
import { ReturnsBuffer } from './returns-buffer.js';
import { isSequenceMethod, makeRunningInterval, SEQUENCE_METHODS, type SequenceSettings } from './sequence.js';
import type { RunningInterval } from '../stats/index.js';
import type { Annotations } from '../options/annotation-options.js';

/** The options a stored estimate keeps, to resume it and to re-analyse it the same way. */
export interface StoredOptions {
  /** Episodes to run; the cap in a target-error run. */
  readonly episodes: number;
  /** As asked (null: the default); the stored record keeps the method actually used. */
  readonly method: IntervalChoice | null;
  readonly sigma: number | null;
  readonly level: number;
  readonly bounds: [number, number] | null;
  readonly targetError: number | null;
  readonly workers: number;
  /** Seconds one plug-in call may take (absent in runs stored before it existed: the default). */
  readonly stepTimeout?: number;
  /** The event whose probability the run stopped on (`--target-event`), as written; absent: the mean. */
  readonly targetEvent?: string | null;
}

export interface StoredEstimateRequest {
  readonly db: Db;
  readonly spec: RolloutSpec;
  readonly options: StoredOptions;
  readonly toolVersion: string;
  readonly shard: ShardInfo | null;
  /** Episode range of this run: all of it, or one shard's part. */
  readonly first: number;
  readonly signal?: AbortSignal;
  readonly onProgress?: (p: EstimateProgress) => void;
  /** Told how far a slow figure has got, once the episodes are done. */
  readonly onAnalysis?: AnalysisProgress;
  /** Risk figures to compute from the returns once the run is done (`--risk`). */
  readonly risk?: RiskRequest | null;
  /** Told the run id as soon as the run exists (so Ctrl-C can say how to resume). */
  readonly onRunId?: (id: string) => void;
  /** Labels and a note the run is created with. */
  readonly annotations?: Annotations;
}

/** The files both definitions were read from, with their hashes now. */
function filesOf(spec: RolloutSpec) {
  return [
    ...definitionFiles('environment', spec.env.source.file ?? null, spec.env.json, spec.env.source.baseDir),
    ...definitionFiles('policy', spec.policy.source.file ?? null, spec.policy.json, spec.policy.source.baseDir),
  ];
}

function storedDefinition(part: RolloutSpec['env']) {
  return { label: part.source.label, json: part.json, baseDir: part.source.baseDir, hash: definitionHash(part.json, part.source.baseDir) };
}

/**
 * An estimate whose episodes are committed to the store as they finish, in episode order,
 * one transaction a block: killed at any point, the run keeps every committed block and
 * `resumeStoredEstimate` finishes it with the figures of an uninterrupted run.
 */
export async function runStoredEstimate(request: StoredEstimateRequest): Promise<{ runId: string; result: EstimateResult }> {
  const { db, spec, options } = request;
  let runId = '';
  const env = storedDefinition(spec.env);
  const policy = storedDefinition(spec.policy);
  return execute(request, null, (facts: EnvironmentFacts, method: IntervalChoice) => {
    runId = createRun(db, {
      kind: 'estimate',
      env,
      policy,
      seed: spec.seed,
      start: spec.start,
      noise: spec.noise,
      firstEpisode: request.first,
      episodesRequested: options.episodes,
      options: { ...options, method },
      facts,
      toolVersion: request.toolVersion,
      machine: machineFacts(),
      shard: request.shard,
      files: filesOf(spec),
      labels: request.annotations?.labels,
      note: request.annotations?.note,
    });
    request.onRunId?.(runId);
    return runId;
  });
}

/** Continues a run that was interrupted or whose process died, from its last committed episode. */
export async function resumeStoredEstimate(
  db: Db,
  run: RunRecord,
  extra: { signal?: AbortSignal; onProgress?: (p: EstimateProgress) => void; workers?: number; stepTimeout?: number },
): Promise<{ runId: string; result: EstimateResult }> {
  if (run.kind !== 'estimate') throw new InputError(`run ${run.id}`, `is ${runKindPhrase(run.kind)}; only estimate runs can be resumed`);
  if (run.status === 'done') throw new InputError(`run ${run.id}`, "is already done; see it with 'reckon runs show " + run.id + "'");
  refuseIfLive(run, 'resume it');
  const spec: RolloutSpec = {
    env: { json: run.env.json, source: { label: run.env.label, baseDir: run.env.baseDir } },
    policy: { json: run.policy.json, source: { label: run.policy.label, baseDir: run.policy.baseDir } },
    seed: run.seed,
    start: run.start,
    noise: run.noise,
  };
  const changed = run.files ? firstChangedFile(run.files) : null;
  if (changed) {
    const file = displayPath(changed.file.path);
    const how = { changed: 'has changed', missing: 'is missing', back: 'exists now but was missing' }[changed.now];
    throw new InputError(
      `run ${run.id}`,
      `${file} (part of its ${changed.file.role}) ${how} since the run started, so it cannot be continued exactly; restore the file, or start a new run`,
    );
  }
  // Runs stored before their files were recorded: the hash covers the files they name.
  for (const [what, stored] of [['environment', run.env], ['policy', run.policy]] as const) {
    if (definitionHash(stored.json, stored.baseDir) !== stored.hash) {
      throw new InputError(`run ${run.id}`, `a file named by its ${what} (${stored.label}) has changed since it started, so it cannot be continued exactly; start a new run`);
    }
  }
  const stored = run.options as unknown as StoredOptions;
  const options: StoredOptions = { ...stored, workers: extra.workers ?? stored.workers, stepTimeout: extra.stepTimeout ?? stored.stepTimeout };
  claimRun(db, run.id);
  const prior = loadEpisodes(db, run);
  try {
    return await execute(
      { db, spec, options, toolVersion: run.toolVersion, shard: run.shard, first: run.firstEpisode, signal: extra.signal, onProgress: extra.onProgress },
      { prior, seconds: run.seconds },
      () => run.id,
    );
  } catch (e) {
    // Stopped while its code was still being loaded: the run is left as it was, interrupted.
    if (e instanceof StoppedEarly && e.runId === null) {
      e.runId = run.id;
      finishRun(db, run.id, 'interrupted', null);
    }
    throw e;
  }
}

async function execute(
  request: StoredEstimateRequest,
  resume: { prior: { returns: Float64Array; lengths: Uint32Array; finals: Int32Array | null }; seconds: number } | null,
  open: (facts: EnvironmentFacts, method: IntervalChoice) => string,
): Promise<{ runId: string; result: EstimateResult }> {
  const { db, spec, options } = request;
  let runId = '';
  const stopBeating = keepHeartbeat(db, () => (runId ? [runId] : []), HEARTBEAT_SECONDS);
  try {
    const result = await runEstimate({
      spec,
      episodes: options.episodes,
      workers: options.workers,
      method: options.method,
      level: options.level,
      bounds: options.bounds,
      targetError: options.targetError,
      sigma: options.sigma,
      stepTimeout: options.stepTimeout,
      first: request.first,
      prior: resume?.prior,
      priorSeconds: resume?.seconds,
      signal: request.signal,
      onProgress: request.onProgress,
      onAnalysis: request.onAnalysis,
      risk: request.risk ?? null,
      targetEvent: options.targetEvent ? parseEvent(options.targetEvent) : null,
      onFacts: (facts, method) => {
        runId = open(facts, method);
      },
      onBlock: (block, steps, seconds) => appendChunk(db, runId, block, steps, seconds),
    });
    finishRun(db, runId, result.interrupted ? 'interrupted' : 'done', result.interrupted ? null : summaryOf(result));
    return { runId, result };
  } catch (e) {
    if (e instanceof StoppedEarly) {
      e.runId = runId || null;
      if (runId) finishRun(db, runId, 'interrupted', null);
    } else if (runId) finishRun(db, runId, 'failed', null, e instanceof Error ? e.message : String(e));
    throw e;
  } finally {
    stopBeating();
  }
}

/** What `runs list` shows without re-reading the episodes. */
function summaryOf(result: EstimateResult): Record<string, unknown> {
  return { episodes: result.episodes, mean: result.mean, std: result.std, ci: result.ci };
}

export interface AnalysisOverrides {
  readonly method?: IntervalChoice;
  readonly level?: number;
  /** Allow a fixed-sample interval on a target-error run, as a what-if. */
  readonly ignoreStop?: boolean;
  readonly onAnalysis?: AnalysisProgress;
  readonly risk?: RiskRequest | null;
}

/**
 * The figures of a stored run recomputed from its stored returns: a different interval method
 * or level is a re-analysis, with no new episodes.
 */
export function analyzeStoredRun(db: Db, run: RunRecord, overrides: AnalysisOverrides = {}): EstimateResult {
  const stored = run.options as unknown as StoredOptions;
  // A target-error run stopped when its sequence was narrow enough, so a fixed-sample interval
  // of its returns loses its coverage: refused, unless asked for as a what-if (then no target
  // is reported). Another sequence is valid at any stop and keeps the target.
  const fixedOverride = overrides.method !== undefined && !isSequenceMethod(overrides.method);
  if (fixedOverride && stored.targetError !== null && stored.targetError !== undefined && !overrides.ignoreStop) {
    throw new InputError(
      '--ci',
      `run ${run.id} stopped when its interval reached ±${stored.targetError}, and "${overrides.method}" is a fixed-sample interval, which loses its coverage at a stop chosen by the data; use ${SEQUENCE_METHODS.join(', ')}, or add --ignore-stop for a what-if that ignores how the run stopped`,
    );
  }
  const facts = run.facts as EnvironmentFacts;
  const episodes = loadEpisodes(db, run);
  if (episodes.returns.length < 2) {
    throw new InputError(`run ${run.id}`, `has ${episodes.returns.length} stored episode(s), too few for an interval; resume it with 'reckon runs resume ${run.id}'`);
  }
  const buffer = new ReturnsBuffer(episodes.returns.length, facts.horizon);
  buffer.append(episodes.returns, episodes.lengths, episodes.finals);
  return computeFigures(
    buffer,
    facts,
    {
      method: overrides.method ?? stored.method ?? 't',
      level: overrides.level ?? stored.level,
      bounds: stored.bounds,
      targetError: fixedOverride ? null : stored.targetError,
      sigma: stored.sigma ?? null,
      seed: run.seed,
      start: run.start,
      onAnalysis: overrides.onAnalysis,
      noise: run.noise,
      risk: overrides.risk ?? null,
      ...(stored.targetEvent && !fixedOverride ? { targetError: null, plannedEpisodes: false as const, targetEvent: { event: parseEvent(stored.targetEvent), error: stored.targetError!, episodes } } : {}),
    },
    { steps: run.steps, seconds: run.seconds, workers: stored.workers },
    run.episodesRequested,
  );
}

/**
 * The confidence sequence a stored run stopped on (or, for `--ci betting`, the one it reported),
 * as a factory for a fresh copy: what its convergence plot draws, so that the band is the run's
 * own interval at every n rather than a fixed-n band. Null for a fixed-sample run.
 */
export function storedRunSequence(run: RunRecord, level?: number): { method: string; make: () => RunningInterval } | null {
  const stored = run.options as unknown as StoredOptions;
  const facts = run.facts as EnvironmentFacts;
  const method = stored.method ?? (stored.targetError !== null ? (run.summary as { ci?: { method?: string } } | null)?.ci?.method : undefined);
  if (method === undefined || !isSequenceMethod(method)) return null;
  const settings: SequenceSettings = {
    method,
    level: level ?? stored.level,
    bounds: stored.bounds ?? facts.returnBounds,
    sigma: stored.sigma ?? null,
    targetError: stored.targetError ?? Number.NaN,
    plannedEpisodes: run.episodesRequested,
  };
  return { method, make: () => makeRunningInterval(settings) };
}
