import type { EventSpec, RiskRequest } from '../options/risk-options.js';
import { pairedRiskDifferences, type PairedRiskDifferences } from '../stats/paired-risk.js';
import { keepCodeWorkers, runEpisodes } from '../engine/pool.js';
import type { PreparedRollout } from '../engine/prepare.js';
import { prepareForRun } from './prepare-for-run.js';
import { newBlock, NO_FINAL_STATE, type EpisodeBlock } from '../engine/episode-block.js';
import type { RolloutSpec } from '../engine/spec.js';
import type { NoiseMode } from '../engine/noise.js';
import { InputError, StoppedEarly } from '../errors.js';
import { comparePolicies, differenceBounds, type DifferenceMethod, type PolicyComparison, type RunningInterval } from '../stats/index.js';
import { compareGroups, type GroupComparison, type PolicyGroup } from '../stats/groups/index.js';
import type { EnvironmentFacts } from './environment-facts.js';
import type { EstimateResult } from './estimate.js';
import { differenceWarnings } from './interval-advice.js';
import { computeFigures, type AnalysisProgress, type ReportedInterval, type TargetOutcome } from './figures.js';
import { ReturnsBuffer } from './returns-buffer.js';
import { episodeTest, resolveEvent } from './episode-events.js';
import { chooseSequence, makeRunningInterval, sequenceInterval, targetReached, type SequenceChoice, type SequenceSettings } from './sequence.js';

type Definition = RolloutSpec['env'];

export interface CompareRequest {
  readonly env: Definition;
  readonly policies: readonly Definition[];
  readonly seed: number;
  readonly start: string | null;
  /** How draws are keyed for every policy (engine/noise.ts): the same mode gives each policy the figures `estimate` gives it. */
  readonly noise: NoiseMode;
  /** Episodes per policy; with `targetError`, the cap. */
  readonly episodes: number;
  readonly workers: number;
  /** Interval for each paired difference in a fixed-size comparison. */
  readonly method: DifferenceMethod;
  /** Sequence for a target-error comparison (null: the default). */
  readonly sequence: SequenceChoice | null;
  readonly level: number;
  readonly bounds: [number, number] | null;
  readonly sigma: number | null;
  /** Run until every pairwise difference's interval is at most this wide (half-width). */
  readonly targetError: number | null;
  readonly interquartileMean: boolean;
  /** Risk figures of each policy and their paired differences (`--risk`). */
  readonly risk?: RiskRequest | null;
  /** Policies trained by one method with different seeds (`--group`), by position in `policies`. */
  readonly groups?: readonly PolicyGroup[] | null;
  readonly signal?: AbortSignal;
  /** Seconds one call into a plug-in may take before the run fails (default 10). */
  readonly stepTimeout?: number;
  readonly onProgress?: (progress: { done: number; total: number; seconds: number; halfWidth: number; targetError: number | null }) => void;
  /** Called once facts are known, before any episode: lets a caller create stored runs. */
  readonly onStart?: (facts: readonly EnvironmentFacts[], sequence: SequenceChoice | null) => void;
  /**
   * Called with each policy's kept episodes, in episode order: block by block as they finish in
   * a fixed-size comparison (where every episode is kept), batch by batch up to the stop in a
   * target-error one.
   */
  readonly onEpisodes?: (policy: number, block: EpisodeBlock, steps: number, seconds: number) => void;
  /** Told how far a slow figure has got, once the episodes are done. */
  readonly onAnalysis?: AnalysisProgress;
  /**
   * Each policy's episodes already run and stored (a resumed comparison), from episode 0 on.
   * The comparison continues from the shortest; a longer one's extra episodes are used, not run again.
   */
  readonly prior?: readonly { returns: Float64Array; lengths: Uint32Array; finals?: Int32Array | null }[];
  /** Sampling seconds the prior episodes took. */
  readonly priorSeconds?: number;
}

export interface ComparisonResult {
  readonly request: CompareRequest;
  readonly facts: readonly EnvironmentFacts[];
  /** Each policy's own estimate (fixed-sample t, or its sequence in a target-error run). */
  readonly estimates: readonly EstimateResult[];
  readonly comparison: PolicyComparison;
  /** Per pair (in `comparison.pairs` order), the interval reported for the difference. */
  readonly differenceIntervals: readonly ReportedInterval[];
  readonly episodes: number;
  /** Sampling plus analysis. */
  readonly seconds: number;
  /** Running the episodes of every policy. */
  readonly samplingSeconds: number;
  /** Computing every figure from the returns. */
  readonly analysisSeconds: number;
  readonly target: TargetOutcome | null;
  readonly interrupted: boolean;
  /** Advice about the difference intervals at this sample size and share of ties. */
  readonly warnings: readonly string[];
  /** Per pair (in `comparison.pairs` order), the differences of the risk figures; null without `--risk`. */
  readonly riskDifferences: readonly PairedRiskDifferences[] | null;
  /** The two-level report of each group and the differences between groups; null without `--group`. */
  readonly groups: GroupComparison | null;
}

/**
 * Runs every policy on the same episode indices with the same seed. Environment and policy
 * draw from separate streams (engine/streams.ts), so episode i's environment noise is common
 * to all policies (common random numbers) and the paired differences have the variance
 * Var A + Var B − 2 Cov(A, B) (docs/methods.md §8.1). A target-error comparison runs in growing
 * batches and stops at the first episode where every pair's confidence sequence is narrow
 * enough; that episode depends on the returns alone.
 */
export async function runComparison(request: CompareRequest): Promise<ComparisonResult> {
  if (request.policies.length < 2) throw new InputError('--policy', 'a comparison needs at least two policies: give --policy twice or more');
  const specs: RolloutSpec[] = request.policies.map((policy) => ({ env: request.env, policy, seed: request.seed, start: request.start, noise: request.noise }));
  const facts: EnvironmentFacts[] = [];
  const prepared: (PreparedRollout | null)[] = [];
  const priorCount = request.prior ? Math.min(...request.prior.map((p) => p.returns.length)) : 0;
  for (const spec of specs) {
    try {
      const ready = await prepareForRun(spec, request.signal);
      prepared.push(ready.prepared);
      facts.push(ready.facts);
    } catch (e) {
      if (e instanceof StoppedEarly) throw new StoppedEarly(priorCount, request.episodes, true);
      throw e;
    }
  }
  // A misspelt terminal fails before any episode runs.
  for (const event of request.risk?.events ?? []) resolveEvent(event, facts[0]);
  const k = specs.length;
  const pairs: [number, number][] = [];
  for (let i = 0; i < k; i++) for (let j = i + 1; j < k; j++) pairs.push([i, j]);

  let sequences: RunningInterval[] = [];
  let pairSettings: SequenceSettings[] = [];
  let sequence: SequenceChoice | null = null;
  if (request.targetError !== null) {
    const policyBounds = facts.map((f) => request.bounds ?? f.returnBounds);
    pairSettings = pairs.map(([i, j]) => {
      const bounds = policyBounds[i] && policyBounds[j] ? differenceBounds(policyBounds[i]!, policyBounds[j]!) : null;
      // A user's σ is for one return; a difference of two such returns is at most 2σ-sub-Gaussian.
      const sigma = request.sigma === null ? null : 2 * request.sigma;
      const method = chooseSequence(request.sequence, bounds, sigma);
      return { method, level: request.level, bounds, sigma, targetError: request.targetError!, plannedEpisodes: request.episodes };
    });
    sequence = pairSettings[0].method;
    sequences = pairSettings.map(makeRunningInterval);
  }
  request.onStart?.(facts, sequence);

  const keepEpisodes = needsEpisodes(request.risk ?? null);
  const buffers = facts.map((f) => new ReturnsBuffer(Math.min(request.episodes, 1 << 20), f.horizon, { keepEpisodes }));
  const single = new Float64Array(1);
  const started = performance.now();
  const priorSeconds = request.priorSeconds ?? 0;
  let reached = false;
  let done = 0;
  /** How many of these paired returns the comparison keeps: all, unless every pair reaches the target among them. */
  const offer = (batchReturns: readonly Float64Array[], count: number): number => {
    for (let e = 0; e < count && sequences.length > 0; e++) {
      let all = true;
      pairs.forEach(([i, j], q) => {
        single[0] = batchReturns[i][e] - batchReturns[j][e];
        sequences[q].add(single);
        if (!targetReached(sequences[q], pairSettings[q])) all = false;
      });
      if (all) {
        reached = true;
        return e + 1;
      }
    }
    return count;
  };
  // A resumed comparison: the stored pairs go through the sequences first, in episode order, so
  // it stops where an uninterrupted one would; a policy's episodes past the shortest are reused.
  const surplus: EpisodeBlock[] = specs.map(() => newBlock(0, 0));
  if (request.prior) {
    const keep = offer(request.prior.map((p) => p.returns), priorCount);
    request.prior.forEach((p, q) => {
      // Episodes stored before final states were kept have none.
      const finals = p.finals ?? new Int32Array(p.returns.length).fill(NO_FINAL_STATE);
      buffers[q].append(p.returns.subarray(0, keep), p.lengths.subarray(0, keep), finals.subarray(0, keep));
      surplus[q] = { first: keep, count: p.returns.length - keep, returns: p.returns.subarray(keep), lengths: p.lengths.subarray(keep), finals: finals.subarray(keep) };
    });
    done = keep;
  }
  // A fixed-size comparison keeps every episode it runs, so each policy's are stored as they
  // come: stopped part-way, every member keeps what it ran, and a resume reuses it. A
  // target-error comparison hands over only the pairs before its stop, batch by batch.
  const streaming = sequences.length === 0;
  let batch = request.targetError === null ? request.episodes : 2000;
  // A code environment's threads load the definitions and the user's module once per policy,
  // not once per batch: each policy's threads are kept from one batch to the next.
  const kept = specs.map((spec) => keepCodeWorkers(spec));
  try {
    while (done < request.episodes && !reached && !request.signal?.aborted) {
      const count = Math.min(batch, request.episodes - done);
      const blocks: EpisodeBlock[][] = [];
      for (let p = 0; p < k; p++) {
        const reused = takeSurplus(surplus, p, done, count);
        const collected: EpisodeBlock[] = reused ? [reused] : [];
        if (reused?.count === count) {
          blocks.push(collected);
          continue;
        }
        await runEpisodes(specs[p], {
          prepared: prepared[p] ?? undefined,
          keep: kept[p],
          first: done + (reused?.count ?? 0),
          count: count - (reused?.count ?? 0),
          workers: request.workers,
          stepTimeout: request.stepTimeout,
          signal: request.signal,
          onBlock: (block, blockSteps) => {
            collected.push(block);
            if (streaming) request.onEpisodes?.(p, block, blockSteps, priorSeconds + (performance.now() - started) / 1000);
            request.onProgress?.({
              done: done + ((p * count + collected.reduce((n, b) => n + b.count, 0)) / k),
              total: request.episodes,
              seconds: (performance.now() - started) / 1000,
              halfWidth: Number.NaN,
              targetError: request.targetError,
            });
          },
        });
        blocks.push(collected);
      }
      const batchReturns = blocks.map((list) => concat(list, 'returns') as Float64Array);
      const batchLengths = blocks.map((list) => concat(list, 'lengths') as Uint32Array);
      const batchFinals = blocks.map((list) => concat(list, 'finals') as Int32Array);
      const keep = offer(batchReturns, Math.min(...batchReturns.map((r) => r.length))); // shorter only when interrupted
      const seconds = priorSeconds + (performance.now() - started) / 1000;
      for (let p = 0; p < k; p++) {
        const returns = batchReturns[p].subarray(0, keep);
        const lengths = batchLengths[p].subarray(0, keep);
        const finals = batchFinals[p].subarray(0, keep);
        buffers[p].append(returns, lengths, finals);
        if (streaming) continue;
        let steps = 0;
        for (let e = 0; e < keep; e++) steps += lengths[e];
        request.onEpisodes?.(p, { first: done, count: keep, returns, lengths, finals }, steps, seconds);
      }
      done += keep;
      if (sequences.length > 0) {
        request.onProgress?.({
          done,
          total: request.episodes,
          seconds,
          halfWidth: Math.max(...sequences.map((s) => s.interval().halfWidth)),
          targetError: request.targetError,
        });
      }
      batch = Math.min(batch * 2, 200_000);
    }
  } finally {
    for (const threads of kept) threads?.close();
  }
  if (done < 2 && request.signal?.aborted && !reached) throw new StoppedEarly(done, request.episodes);
  if (done < 2) throw new InputError('compare', `stopped after ${done} episode(s), too few to compare`);
  const seconds = priorSeconds + (performance.now() - started) / 1000;
  return summarizeComparison(request, facts, buffers, sequence, seconds, reached);
}

/**
 * Every figure of a comparison from the policies' returns: shared by a fresh comparison and
 * by `runs show` on a stored one, so both print the same numbers.
 */
export function summarizeComparison(
  request: CompareRequest,
  facts: readonly EnvironmentFacts[],
  buffers: readonly ReturnsBuffer[],
  sequence: SequenceChoice | null,
  seconds: number,
  reached: boolean,
): ComparisonResult {
  const analysisStarted = performance.now();
  const episodes = buffers[0].count;
  const estimates = buffers.map((buffer, p) =>
    computeFigures(
      buffer,
      facts[p],
      {
        method: sequence ?? (request.method === 't' ? 't' : request.method),
        level: request.level,
        bounds: request.bounds,
        targetError: null,
        sigma: request.sigma,
        seed: request.seed,
        start: request.start,
        onAnalysis: request.onAnalysis,
        plannedEpisodes: false,
        risk: request.risk ?? null,
        noise: request.noise,
      },
      { steps: buffer.lengthSum, seconds: seconds / buffers.length, workers: request.workers },
      request.episodes,
    ),
  );
  const comparison = comparePolicies(
    buffers.map((b) => b.view()),
    { level: request.level, method: request.method, seed: request.seed, interquartileMean: request.interquartileMean, onProgress: request.onAnalysis },
  );
  let differenceIntervals: ReportedInterval[] = comparison.pairs.map((pair) => ({ ...pair.interval, anytimeValid: false }));
  if (sequence !== null && request.targetError !== null) {
    differenceIntervals = comparison.pairs.map((pair) => {
      const boundsA = request.bounds ?? facts[pair.first].returnBounds;
      const boundsB = request.bounds ?? facts[pair.second].returnBounds;
      const settings: SequenceSettings = {
        method: sequence,
        level: request.level,
        bounds: boundsA && boundsB ? differenceBounds(boundsA, boundsB) : null,
        sigma: request.sigma === null ? null : 2 * request.sigma,
        targetError: request.targetError!,
        plannedEpisodes: request.episodes,
      };
      const running = makeRunningInterval(settings);
      const a = buffers[pair.first].view();
      const b = buffers[pair.second].view();
      const differences = new Float64Array(a.length);
      for (let e = 0; e < a.length; e++) differences[e] = a[e] - b[e];
      running.add(differences);
      return sequenceInterval(running, settings, targetReached(running, settings), pair.meanDifference);
    });
  }
  const warnings: string[] = [];
  if (sequence === null && request.method !== 't') {
    for (const pair of comparison.pairs) {
      const a = buffers[pair.first].view();
      const b = buffers[pair.second].view();
      const differences = new Float64Array(a.length);
      for (let e = 0; e < a.length; e++) differences[e] = a[e] - b[e];
      for (const w of differenceWarnings(request.method, differences)) warnings.push(`[${pair.first}] − [${pair.second}]: ${w}`);
    }
  }
  // Length and terminal events are paired from each episode's length and final state; they are
  // left out (with a word) where those were not kept.
  const pairedEvents = (request.risk?.events ?? []).filter((e) => e.subject === 'return' || eventIndicators(e, facts[0], buffers[0]) !== null);
  for (const e of request.risk?.events ?? []) {
    if (!pairedEvents.includes(e)) warnings.push(`P(${e.text}): not paired, since where or when these episodes ended was not kept; each policy's figure is above`);
  }
  const riskDifferences = request.risk
    ? comparison.pairs.map((pair) => {
        const indicators = pairedEvents.map((e) => {
          if (e.subject === 'return') return null;
          return [eventIndicators(e, facts[pair.first], buffers[pair.first])!, eventIndicators(e, facts[pair.second], buffers[pair.second])!] as const;
        });
        return pairedRiskDifferences(buffers[pair.first].view(), buffers[pair.second].view(), {
          tail: request.risk!.tail,
          events: pairedEvents,
          level: request.level,
          seed: request.seed,
          indicators,
        });
      })
    : null;
  if (riskDifferences) {
    comparison.pairs.forEach((pair, q) => {
      const d = riskDifferences[q].tailMean;
      const [better, worse] = pair.meanDifference >= 0 ? [pair.first, pair.second] : [pair.second, pair.first];
      const tailOfBetter = pair.meanDifference >= 0 ? d.estimate : -d.estimate;
      if (pair.meanDifference !== 0 && tailOfBetter < 0) {
        const sure = (pair.meanDifference >= 0 ? d.high : -d.low) < 0;
        warnings.push(
          `[${better}] has the better mean but the worse tail: its worst ${+(request.risk!.tail * 100).toFixed(2)}% average ${Math.abs(d.estimate).toPrecision(3)} below [${worse}]'s${sure ? ' (the paired interval excludes 0)' : ' (the paired interval includes 0)'}`,
        );
      }
    });
  }
  // Every member ran on the same episodes: their shared noise counts (docs/methods.md §15.3).
  const groups = request.groups && request.groups.length > 0
    ? compareGroups(buffers.map((b) => b.view()), request.groups, { level: request.level, seed: request.seed, sharedEpisodes: true })
    : null;
  const target = request.targetError === null ? null : { error: request.targetError, reached, maxEpisodes: request.episodes };
  const analysisSeconds = (performance.now() - analysisStarted) / 1000;
  return {
    request,
    facts,
    estimates,
    comparison,
    differenceIntervals,
    episodes,
    seconds: seconds + analysisSeconds,
    samplingSeconds: seconds,
    analysisSeconds,
    target,
    interrupted: target ? !reached && episodes < request.episodes : episodes < request.episodes,
    warnings,
    riskDifferences,
    groups,
  };
}

/**
 * The part of policy p's stored surplus (episodes past the shortest policy's, from a resumed
 * comparison) that falls in [first, first + count), removed from the surplus; null when none.
 */
function takeSurplus(surplus: EpisodeBlock[], p: number, first: number, count: number): EpisodeBlock | null {
  const s = surplus[p];
  if (s.count === 0 || s.first !== first) return null;
  const n = Math.min(count, s.count);
  surplus[p] = { first: s.first + n, count: s.count - n, returns: s.returns.subarray(n), lengths: s.lengths.subarray(n), finals: s.finals.subarray(n) };
  return { first, count: n, returns: s.returns.subarray(0, n), lengths: s.lengths.subarray(0, n), finals: s.finals.subarray(0, n) };
}

function concat(blocks: readonly EpisodeBlock[], key: 'returns' | 'lengths' | 'finals'): Float64Array | Uint32Array | Int32Array {
  const total = blocks.reduce((n, b) => n + b.count, 0);
  const out = key === 'returns' ? new Float64Array(total) : key === 'lengths' ? new Uint32Array(total) : new Int32Array(total);
  let offset = 0;
  for (const b of blocks) {
    out.set(b[key], offset);
    offset += b.count;
  }
  return out;
}

/** Whether paired differences of these events need each episode's length and final state. */
export function needsEpisodes(risk: RiskRequest | null): boolean {
  return risk !== null && risk.events.some((e) => e.subject !== 'return');
}

/** 1 where the event happened, episode by episode, or null when the buffer did not keep what it needs. */
function eventIndicators(event: EventSpec, facts: EnvironmentFacts, buffer: ReturnsBuffer): Uint8Array | null {
  const kept = buffer.episodes();
  if (!kept || (event.subject === 'terminal' && !kept.finals)) return null;
  const happens = episodeTest(resolveEvent(event, facts));
  const returns = buffer.view();
  const out = new Uint8Array(returns.length);
  for (let i = 0; i < returns.length; i++) out[i] = happens(returns[i], kept.lengths[i], kept.finals ? kept.finals[i] : Number.NaN) ? 1 : 0;
  return out;
}
