import type { RiskRequest } from '../options/risk-options.js';
import { createHash } from 'node:crypto';
import { definitionHash } from '../store/definition-hash.js';
import { machineFacts } from '../store/machine.js';
import type { Db } from '../store/open.js';
import { appendChunk, claimRun, createRun, finishRun, keepHeartbeat, listMembers, loadEpisodes, refuseIfLive, type RunRecord } from '../store/runs.js';
import { definitionFiles, displayPath, firstChangedFile } from '../store/definition-files.js';
import { HEARTBEAT_SECONDS } from '../store/owner.js';
import { InputError, StoppedEarly } from '../errors.js';
import type { DifferenceMethod } from '../stats/index.js';
import { needsEpisodes, runComparison, summarizeComparison, type CompareRequest, type ComparisonResult } from './compare.js';
import type { PolicyGroup } from '../stats/groups/index.js';
import type { EnvironmentFacts } from './environment-facts.js';
import type { AnalysisProgress } from './figures.js';
import { ReturnsBuffer } from './returns-buffer.js';
import type { SequenceChoice } from './sequence.js';
import type { Annotations } from '../options/annotation-options.js';

/** What a stored comparison keeps to be shown again exactly. */
interface ComparisonOptions {
  episodes: number;
  method: DifferenceMethod;
  sequence: SequenceChoice | null;
  level: number;
  bounds: [number, number] | null;
  sigma: number | null;
  targetError: number | null;
  interquartileMean: boolean;
  workers: number;
  policies: string[];
  /** Seconds one plug-in call may take (absent in comparisons stored before it was kept: the default). */
  stepTimeout?: number;
  /** Policy groups by position in `policies` (absent in comparisons stored without groups). */
  groups?: PolicyGroup[];
}

/** The files a comparison was defined by: the environment's and every policy's, with their hashes now. */
function filesOf(request: CompareRequest) {
  return [
    ...definitionFiles('environment', request.env.source.file ?? null, request.env.json, request.env.source.baseDir),
    ...request.policies.flatMap((p) => definitionFiles('policy', p.source.file ?? null, p.json, p.source.baseDir)),
  ];
}

/** A comparison's runs in the store as it goes: the comparison, its members, and the episodes each has stored. */
interface StoredComparisonRuns {
  parentId: string;
  readonly children: string[];
  readonly stored: number[];
}

/**
 * A comparison kept as one run of kind `comparison` whose member runs (one estimate run per
 * policy, `parent_id` pointing at it) hold the episodes; `runs show` recomputes it from them.
 */
export async function runStoredComparison(
  db: Db,
  request: CompareRequest,
  toolVersion: string,
  /** `onRunId`: told the comparison's id once it and its member runs exist, before any episode. */
  hooks: { onRunId?: (id: string) => void; annotations?: Annotations } = {},
): Promise<{ runId: string; result: ComparisonResult; memberIds: string[] }> {
  const runs: StoredComparisonRuns = { parentId: '', children: [], stored: [] };
  const labels = request.policies.map((p) => p.source.label);
  return executeComparison(db, runs, {
    ...request,
    onStart: (facts, sequence) => {
      request.onStart?.(facts, sequence);
      const policyHashes = request.policies.map((p) => definitionHash(p.json, p.source.baseDir));
      const options: ComparisonOptions = {
        episodes: request.episodes,
        method: request.method,
        sequence,
        level: request.level,
        bounds: request.bounds,
        sigma: request.sigma,
        targetError: request.targetError,
        interquartileMean: request.interquartileMean,
        workers: request.workers,
        policies: labels,
        ...(request.stepTimeout === undefined ? {} : { stepTimeout: request.stepTimeout }),
        ...(request.groups && request.groups.length > 0 ? { groups: request.groups.map((g) => ({ name: g.name, members: [...g.members] })) } : {}),
      };
      const env = { label: request.env.source.label, json: request.env.json, baseDir: request.env.source.baseDir, hash: definitionHash(request.env.json, request.env.source.baseDir) };
      runs.parentId = createRun(db, {
        kind: 'comparison',
        env,
        policy: {
          label: labels.join(' vs '),
          json: request.policies.map((p) => p.json),
          baseDir: request.policies[0].source.baseDir,
          hash: createHash('sha256').update(policyHashes.join(',')).digest('hex'),
        },
        seed: request.seed,
        start: request.start,
        noise: request.noise,
        firstEpisode: 0,
        episodesRequested: request.episodes,
        options: { ...options },
        facts: facts[0],
        toolVersion,
        machine: machineFacts(),
        files: filesOf(request),
        labels: hooks.annotations?.labels,
        note: hooks.annotations?.note,
      });
      request.policies.forEach((policy, p) => {
        runs.children.push(
          createRun(db, {
            kind: 'estimate',
            env,
            policy: { label: policy.source.label, json: policy.json, baseDir: policy.source.baseDir, hash: policyHashes[p] },
            seed: request.seed,
            start: request.start,
            noise: request.noise,
            firstEpisode: 0,
            episodesRequested: request.episodes,
            options: {
              episodes: request.episodes,
              method: sequence ?? request.method,
              sigma: request.sigma,
              level: request.level,
              bounds: request.bounds,
              targetError: null,
              workers: request.workers,
              policyIndex: p,
            },
            facts: facts[p],
            toolVersion,
            machine: machineFacts(),
            parentId: runs.parentId,
          }),
        );
        runs.stored.push(0);
      });
      hooks.onRunId?.(runs.parentId);
    },
  });
}

/**
 * Continues a comparison that was interrupted or whose process died: every member from the
 * episodes it has, on the same seed, so the policies still meet the same environment noise
 * episode by episode, and a target-error comparison replays its stored pairs through its
 * sequences first. The figures equal those of a comparison never interrupted.
 */
export async function resumeStoredComparison(
  db: Db,
  run: RunRecord,
  extra: { signal?: AbortSignal; onProgress?: CompareRequest['onProgress']; workers?: number; stepTimeout?: number },
): Promise<{ runId: string; result: ComparisonResult; memberIds: string[] }> {
  if (run.status === 'done') throw new InputError(`run ${run.id}`, "is already done; see it with 'reckon runs show " + run.id + "'");
  refuseIfLive(run, 'resume it');
  const members = listMembers(db, run.id);
  const options = run.options as unknown as ComparisonOptions;
  if (members.length < 2 || members.length !== options.policies.length) throw new InputError(`run ${run.id}`, 'is a comparison whose member runs are missing, so it cannot be continued; start a new comparison');
  for (const member of members) refuseIfLive(member, 'resume it');
  refuseChangedFiles(run, members);
  const request: CompareRequest = {
    ...storedRequest(run, members, options),
    workers: extra.workers ?? options.workers,
    stepTimeout: extra.stepTimeout ?? options.stepTimeout,
    signal: extra.signal,
    onProgress: extra.onProgress,
  };
  const prior = members.map((m) => loadEpisodes(db, m));
  const runs: StoredComparisonRuns = { parentId: run.id, children: members.map((m) => m.id), stored: prior.map((p) => p.returns.length) };
  for (const id of [run.id, ...runs.children]) claimRun(db, id);
  try {
    return await executeComparison(db, runs, { ...request, prior, priorSeconds: members.reduce((s, m) => Math.max(s, m.seconds), 0) });
  } catch (e) {
    // Stopped while its code was still being loaded: the runs are left as they were, interrupted.
    if (e instanceof StoppedEarly && e.runId === null) {
      e.runId = run.id;
      for (const id of [run.id, ...runs.children]) finishRun(db, id, 'interrupted', null);
    }
    throw e;
  }
}

/** Refuses to continue a comparison whose definition files changed since it started, naming the file. */
function refuseChangedFiles(run: RunRecord, members: readonly RunRecord[]): void {
  const changed = run.files ? firstChangedFile(run.files) : null;
  if (changed) {
    const file = displayPath(changed.file.path);
    const how = { changed: 'has changed', missing: 'is missing', back: 'exists now but was missing' }[changed.now];
    throw new InputError(`run ${run.id}`, `${file} (part of its ${changed.file.role}) ${how} since the comparison started, so it cannot be continued exactly; restore the file, or start a new comparison`);
  }
  // Comparisons stored before their files were recorded: the hashes cover the files they name.
  for (const [what, stored] of [['environment', run.env] as const, ...members.map((m) => ['policy', m.policy] as const)]) {
    if (definitionHash(stored.json, stored.baseDir) !== stored.hash) {
      throw new InputError(`run ${run.id}`, `a file named by its ${what} (${stored.label}) has changed since it started, so it cannot be continued exactly; start a new comparison`);
    }
  }
}

/** Runs a comparison into its stored runs: each member gets the episodes it has not stored yet, and every run its end status. */
async function executeComparison(db: Db, runs: StoredComparisonRuns, request: CompareRequest): Promise<{ runId: string; result: ComparisonResult; memberIds: string[] }> {
  const stopBeating = keepHeartbeat(db, () => (runs.parentId ? [runs.parentId, ...runs.children] : []), HEARTBEAT_SECONDS);
  try {
    const result = await runComparison({
      ...request,
      onEpisodes: (p, block, steps, seconds) => {
        request.onEpisodes?.(p, block, steps, seconds);
        // A resumed member may hold some of these episodes already (its chunks run past another's).
        const skip = Math.max(0, runs.stored[p] - block.first);
        if (skip >= block.count) return;
        const fresh = skip === 0 ? block : { first: block.first + skip, count: block.count - skip, returns: block.returns.subarray(skip), lengths: block.lengths.subarray(skip), finals: block.finals.subarray(skip) };
        let freshSteps = steps;
        if (skip > 0) for (let e = 0; e < skip; e++) freshSteps -= block.lengths[e];
        appendChunk(db, runs.children[p], fresh, freshSteps, seconds);
        runs.stored[p] = fresh.first + fresh.count;
      },
    });
    const status = result.interrupted ? 'interrupted' : 'done';
    result.estimates.forEach((e, p) => finishRun(db, runs.children[p], status, { episodes: e.episodes, mean: e.mean, std: e.std, ci: e.ci }));
    finishRun(db, runs.parentId, status, comparisonSummary(result));
    return { runId: runs.parentId, result, memberIds: [...runs.children] };
  } catch (e) {
    if (e instanceof StoppedEarly) {
      e.runId = runs.parentId || null;
      for (const id of runs.children) finishRun(db, id, 'interrupted', null);
      if (runs.parentId) finishRun(db, runs.parentId, 'interrupted', null);
    } else {
      const message = e instanceof Error ? e.message : String(e);
      for (const id of runs.children) finishRun(db, id, 'failed', null, message);
      if (runs.parentId) finishRun(db, runs.parentId, 'failed', null, message);
    }
    throw e;
  } finally {
    stopBeating();
  }
}

/** What `runs list` shows for a comparison without re-reading episodes. */
function comparisonSummary(result: ComparisonResult): Record<string, unknown> {
  return {
    episodes: result.episodes,
    target_reached: result.target ? result.target.reached : null,
    differences: result.comparison.pairs.map((pair, q) => ({
      a: pair.first,
      b: pair.second,
      mean: pair.meanDifference,
      half_width: result.differenceIntervals[q].halfWidth,
    })),
    ...(result.groups ? { groups: result.groups.groups.map((g) => ({ name: g.name, mean: g.mean, half_width: g.interval.halfWidth, episode_share: g.episodeShare })) } : {}),
  };
}

/** A stored comparison recomputed from its member runs' stored returns. */
export function analyzeStoredComparison(db: Db, run: RunRecord, onAnalysis?: AnalysisProgress, risk: RiskRequest | null = null): { result: ComparisonResult; labels: { env: string; policies: string[] } } {
  const options = run.options as unknown as ComparisonOptions;
  const members = listMembers(db, run.id);
  if (members.length < 2) throw new InputError(`run ${run.id}`, 'is a comparison whose member runs are missing');
  const facts = members.map((m) => m.facts as EnvironmentFacts);
  const episodes = members.map((m) => loadEpisodes(db, m));
  // An interrupted comparison's members may have run different numbers of episodes: the pairs are the shortest's.
  const count = Math.min(...episodes.map((e) => e.returns.length));
  if (count < 2) throw new InputError(`run ${run.id}`, `has ${count} paired episode(s) stored, too few to compare; continue it with 'reckon runs resume ${run.id}'`);
  const buffers = episodes.map(({ returns, lengths, finals }, p) => {
    const buffer = new ReturnsBuffer(count, facts[p].horizon, { keepEpisodes: needsEpisodes(risk) });
    buffer.append(returns.subarray(0, count), lengths.subarray(0, count), finals?.subarray(0, count) ?? null);
    return buffer;
  });
  const request: CompareRequest = { ...storedRequest(run, members, options), onAnalysis, risk };
  const totalSeconds = members.reduce((s, m) => Math.max(s, m.seconds), 0);
  const reached = (run.summary as { target_reached?: boolean } | null)?.target_reached === true;
  const result = summarizeComparison(request, facts, buffers, options.sequence, totalSeconds, reached);
  return { result, labels: { env: run.env.label, policies: options.policies } };
}

/** The request a stored comparison was run with, rebuilt from its stored definitions and options. */
function storedRequest(run: RunRecord, members: readonly RunRecord[], options: ComparisonOptions): CompareRequest {
  return {
    env: { json: run.env.json, source: { label: run.env.label, baseDir: run.env.baseDir } },
    policies: members.map((m) => ({ json: m.policy.json, source: { label: m.policy.label, baseDir: m.policy.baseDir } })),
    seed: run.seed,
    start: run.start,
    noise: run.noise,
    episodes: options.episodes,
    workers: options.workers,
    method: options.method,
    sequence: options.sequence,
    level: options.level,
    bounds: options.bounds,
    sigma: options.sigma,
    targetError: options.targetError,
    interquartileMean: options.interquartileMean,
    groups: options.groups ?? null,
  };
}
