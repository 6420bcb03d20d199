import type { RiskRequest } from '../options/risk-options.js';
import { createHash } from 'node:crypto';
import { definitionHash } from '../store/definition-hash.js';
import { machineFacts } from '../store/machine.js';
import type { Db } from '../store/open.js';
import { appendChunk, createRun, finishRun, keepHeartbeat, listMembers, loadEpisodes, type RunRecord } from '../store/runs.js';
import { HEARTBEAT_SECONDS } from '../store/owner.js';
import { InputError } from '../errors.js';
import type { DifferenceMethod } from '../stats/index.js';
import { needsEpisodes, runComparison, summarizeComparison, type CompareRequest, type ComparisonResult } from './compare.js';
import type { EnvironmentFacts } from './environment-facts.js';
import type { AnalysisProgress } from './figures.js';
import { ReturnsBuffer } from './returns-buffer.js';
import type { SequenceChoice } from './sequence.js';

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
  hooks: { onRunId?: (id: string) => void } = {},
): Promise<{ runId: string; result: ComparisonResult; memberIds: string[] }> {
  let parentId = '';
  const children: string[] = [];
  const labels = request.policies.map((p) => p.source.label);
  const stopBeating = keepHeartbeat(db, () => (parentId ? [parentId, ...children] : []), HEARTBEAT_SECONDS);
  try {
    const result = await runComparison({
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
        };
        const env = { label: request.env.source.label, json: request.env.json, baseDir: request.env.source.baseDir, hash: definitionHash(request.env.json, request.env.source.baseDir) };
        parentId = createRun(db, {
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
        });
        request.policies.forEach((policy, p) => {
          children.push(
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
              parentId,
            }),
          );
        });
        hooks.onRunId?.(parentId);
      },
      onEpisodes: (p, block, steps, seconds) => {
        request.onEpisodes?.(p, block, steps, seconds);
        if (block.count > 0) appendChunk(db, children[p], block, steps, seconds);
      },
    });
    const status = result.interrupted ? 'interrupted' : 'done';
    result.estimates.forEach((e, p) => finishRun(db, children[p], status, { episodes: e.episodes, mean: e.mean, std: e.std, ci: e.ci }));
    finishRun(db, parentId, status, comparisonSummary(result));
    return { runId: parentId, result, memberIds: children };
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    for (const id of children) finishRun(db, id, 'failed', null, message);
    if (parentId) finishRun(db, parentId, 'failed', null, message);
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
  };
}

/** A stored comparison recomputed from its member runs' stored returns. */
export function analyzeStoredComparison(db: Db, run: RunRecord, onAnalysis?: AnalysisProgress, risk: RiskRequest | null = null): { result: ComparisonResult; labels: { env: string; policies: string[] } } {
  const options = run.options as unknown as ComparisonOptions;
  const members = listMembers(db, run.id);
  if (members.length < 2) throw new InputError(`run ${run.id}`, 'is a comparison whose member runs are missing');
  const facts = members.map((m) => m.facts as EnvironmentFacts);
  const buffers = members.map((m, p) => {
    const { returns, lengths, finals } = loadEpisodes(db, m);
    const buffer = new ReturnsBuffer(returns.length, facts[p].horizon, { keepEpisodes: needsEpisodes(risk) });
    buffer.append(returns, lengths, finals);
    return buffer;
  });
  const count = Math.min(...buffers.map((b) => b.count));
  if (count < 2) throw new InputError(`run ${run.id}`, 'has too few stored episodes to compare');
  const request: CompareRequest = {
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
    onAnalysis,
    risk,
  };
  const totalSeconds = members.reduce((s, m) => Math.max(s, m.seconds), 0);
  const reached = (run.summary as { target_reached?: boolean } | null)?.target_reached === true;
  const result = summarizeComparison(request, facts, buffers, options.sequence, totalSeconds, reached);
  return { result, labels: { env: run.env.label, policies: options.policies } };
}
