/**
 * An off-policy evaluation from files: the log, the target policy and, optionally, the
 * environment the log came from. Settles the discount, horizon and reward bounds (the
 * header's, else the environment's; a disagreement is refused) and runs the estimators.
 */
import type { BuiltEnvironment } from '../definitions/built.js';
import { checkRewardBounds, readEpisodeLog, type EpisodeLog } from '../definitions/episode-log.js';
import { formatNumber } from '../definitions/describe-value.js';
import { loadEnvironmentFile, loadPolicyFile, type LoadedEnvironment } from '../definitions/load.js';
import { InputError } from '../errors.js';
import type { FiniteMdp } from '../definitions/finite-mdp.js';
import { returnBounds } from '../exact/return-bounds.js';
import { evaluateLog, type EstimatorName, type OffPolicyResult } from './evaluate-log.js';
import { largestWeight } from './largest-weight.js';
import { loggedLargestWeight } from './logged-largest-weight.js';
import { targetOnLog, type TargetOnLog } from './target-on-log.js';

export interface OffPolicyRequest {
  readonly logPath: string;
  readonly policyPath: string;
  readonly envPath: string | null;
  /** The behaviour policy's file, when known: checks the logged probabilities and bounds the weights. */
  readonly behaviourPath?: string | null;
  /** How messages name the files (default: their paths), e.g. the fields of an HTTP request. */
  readonly labels?: { readonly log?: string; readonly policy?: string; readonly env?: string; readonly behaviour?: string };
  readonly estimators: readonly EstimatorName[];
  readonly level: number;
  readonly seed: number;
  readonly resamples: number;
  readonly folds: number;
}

export interface OffPolicyRun {
  readonly log: EpisodeLog;
  readonly env: LoadedEnvironment | null;
  readonly discount: number;
  readonly horizon: number | null;
  readonly rewardBounds: readonly [number, number] | null;
  readonly returnBounds: readonly [number, number] | null;
  /** The largest weight any episode can have, from the two policies (null when the behaviour is not known everywhere). */
  readonly maxWeight: number | null;
  /** Where the behaviour's probabilities behind maxWeight came from: its file (--behaviour) or the log's behaviour_probs. */
  readonly maxWeightSource: 'behaviour' | 'logged' | null;
  readonly result: OffPolicyResult;
  readonly seconds: number;
}

export async function runOffPolicy(request: OffPolicyRequest): Promise<OffPolicyRun> {
  const started = performance.now();
  const envLabel = request.envPath ? (request.labels?.env ?? request.envPath) : null;
  const env = request.envPath ? await loadEnvironmentFile(request.envPath, envLabel!) : null;
  const log = await readEpisodeLog(request.logPath, request.labels?.log ?? request.logPath);
  const facts = environmentFacts(env?.built ?? null);
  const header = log.header;
  const discount = settle('discount', header?.discount, facts.discount, log, envLabel);
  if (discount === undefined) {
    throw new InputError(log.label, 'does not say its discount: add a first line {"kind": "header", "discount": 0.95, ...} or give --env');
  }
  const horizon = settle('horizon', header?.horizon, facts.horizon, log, envLabel) ?? null;
  let rewardBounds: readonly [number, number] | null = header?.reward_bounds ?? null;
  if (!rewardBounds && facts.rewardBounds) {
    checkRewardBounds(log, facts.rewardBounds, `${envLabel}'s`);
    rewardBounds = facts.rewardBounds;
  }
  if (env && env.built.kind !== 'finite') {
    throw new InputError(envLabel!, 'is a code (module) environment: give a log with a header instead of --env (the target is matched to the log\'s states by name)');
  }
  const target = await targetOnLog(log, request.policyPath, env && env.built.kind === 'finite' ? env.built : null, envLabel, request.labels?.policy ?? request.policyPath);
  let maxWeight = request.behaviourPath ? await behaviourLargestWeight(log, target, env, request.behaviourPath, envLabel, request.labels?.behaviour ?? request.behaviourPath) : null;
  let maxWeightSource: OffPolicyRun['maxWeightSource'] = maxWeight === null ? null : 'behaviour';
  let maxWeightMissing: string | null = null;
  if (maxWeight === null && env && env.built.kind === 'finite' && target.environmentMatrix) {
    // Without the behaviour's file, its logged distributions may still cover every state it can reach.
    const logged = loggedLargestWeight(log, env.built.mdp, target.environmentMatrix, loggedStarts(log, env.built.mdp));
    if (logged.ok) {
      maxWeight = logged.weight;
      maxWeightSource = 'logged';
    } else {
      maxWeightMissing = `the behaviour can reach state ${JSON.stringify(logged.missing)}, whose behaviour_probs no line gives; give --behaviour FILE`;
    }
  }
  const returnBounds = (env && env.built.kind === 'finite' ? exactReturnBounds(log, env.built.mdp) : null) ?? (rewardBounds ? returnBoundsOf(rewardBounds, discount, horizon) : null);
  const result = evaluateLog(log, target, {
    estimators: request.estimators,
    level: request.level,
    seed: request.seed,
    resamples: request.resamples,
    folds: request.folds,
    discount,
    horizon,
    returnBounds,
    maxWeight,
    maxWeightMissing,
  });
  return { log, env, discount, horizon, rewardBounds, returnBounds, maxWeight, maxWeightSource, result, seconds: (performance.now() - started) / 1000 };
}

/** Agreement required between a logged behaviour_prob and the behaviour policy's probability. */
const BEHAVIOUR_TOLERANCE = 1e-6;

/**
 * With the behaviour policy's file: every logged probability must be the policy's (a refusal
 * names the first line that differs), and the largest possible weight follows from the two
 * policies on the environment (largest-weight.ts).
 */
async function behaviourLargestWeight(log: EpisodeLog, target: TargetOnLog, env: LoadedEnvironment | null, path: string, envLabel: string | null, behaviourPath: string): Promise<number> {
  if (!env || env.built.kind !== 'finite' || !target.environmentMatrix) {
    throw new InputError('--behaviour', 'needs --env with a gridworld or tabular environment, on which both policies are known everywhere');
  }
  const mdp = env.built.mdp;
  const behaviour = await loadPolicyFile(path, env.built, behaviourPath);
  const matrix = behaviour.built.matrix;
  if (!matrix) throw new InputError(behaviourPath, 'is a code policy without probabilities(state); the behaviour\'s probabilities are needed');
  const stateOf = log.stateNames.map((name) => mdp.stateIndex.get(name)!);
  const actionOf = log.actionNames.map((name) => mdp.actionNames.indexOf(name));
  for (let k = 0; k < log.state.length; k++) {
    const p = matrix.probability[stateOf[log.state[k]] * mdp.actionCount + actionOf[log.action[k]]];
    if (Math.abs(p - log.behaviourProb[k]) > BEHAVIOUR_TOLERANCE) {
      throw new InputError(
        `${log.label}: line ${log.line[k]}`,
        `behaviour_prob ${formatNumber(log.behaviourProb[k])} differs from ${behaviourPath}'s ${formatNumber(p)} for action ${JSON.stringify(log.actionNames[log.action[k]])} in state ${JSON.stringify(log.stateNames[log.state[k]])}: the log was not written by this behaviour${envLabel ? ` on ${envLabel}` : ''}`,
      );
    }
  }
  return largestWeight(mdp, target.environmentMatrix, matrix, loggedStarts(log, mdp));
}

/** The environment states the log's episodes start in. */
function loggedStarts(log: EpisodeLog, mdp: FiniteMdp): number[] {
  const starts = new Set<number>();
  for (let i = 0; i < log.episodeIds.length; i++) starts.add(mdp.stateIndex.get(log.stateNames[log.state[log.episodeStart[i]]])!);
  return [...starts];
}

/** Fewest start states for which the exact bounds are worth their dynamic programme each. */
const MAX_EXACT_STARTS = 32;

/**
 * The exact smallest and largest return of any policy from the log's first states, by dynamic
 * programming over the environment (exact/return-bounds.ts): much tighter than the reward
 * bounds times the horizon. Null when the log starts in too many states.
 */
function exactReturnBounds(log: EpisodeLog, mdp: FiniteMdp): readonly [number, number] | null {
  const starts = new Set<number>();
  for (let i = 0; i < log.episodeIds.length; i++) starts.add(mdp.stateIndex.get(log.stateNames[log.state[log.episodeStart[i]]])!);
  if (starts.size > MAX_EXACT_STARTS) return null;
  let low = Number.POSITIVE_INFINITY;
  let high = Number.NEGATIVE_INFINITY;
  for (const s of starts) {
    const [l, h] = returnBounds(mdp, null, s);
    low = Math.min(low, l);
    high = Math.max(high, h);
  }
  return [low, high];
}

function environmentFacts(env: BuiltEnvironment | null): { discount?: number; horizon?: number; rewardBounds?: readonly [number, number] } {
  if (!env) return {};
  if (env.kind === 'finite') return { discount: env.mdp.discount, horizon: env.mdp.horizon, rewardBounds: env.mdp.rewardRange };
  return { discount: env.discount, horizon: env.horizon, rewardBounds: env.rewardRange ?? undefined };
}

function settle(name: string, fromLog: number | undefined, fromEnv: number | undefined, log: EpisodeLog, envPath: string | null): number | undefined {
  if (fromLog !== undefined && fromEnv !== undefined && Math.abs(fromLog - fromEnv) > 1e-12) {
    throw new InputError(`${log.label}: line 1`, `the header's ${name} ${formatNumber(fromLog)} differs from ${envPath}'s ${formatNumber(fromEnv)}: the log does not come from this environment, or one of them is wrong`);
  }
  return fromLog ?? fromEnv;
}

/**
 * Bounds on any episode's return from bounds on a step's reward: with S = Σ_{t<H} γ^t (or
 * 1/(1 − γ) without a horizon), G ∈ [min(0, lo)·S, max(0, hi)·S], whatever the length.
 * Null for an undiscounted problem with no horizon.
 */
export function returnBoundsOf(rewardBounds: readonly [number, number], discount: number, horizon: number | null): readonly [number, number] | null {
  let span: number;
  if (horizon !== null) span = discount === 1 ? horizon : (1 - discount ** horizon) / (1 - discount);
  else if (discount < 1) span = 1 / (1 - discount);
  else return null;
  return [Math.min(0, rewardBounds[0]) * span, Math.max(0, rewardBounds[1]) * span];
}
