/**
 * An off-policy evaluation from files: the log, the target policy and, optionally, the
 * environment the log came from. Settles the discount, horizon and reward bounds (the
 * header's, else the environment's; a disagreement is refused) and runs the estimators.
 */
import type { BuiltEnvironment } from '../definitions/built.js';
import { checkRewardBounds, readEpisodeLog, type EpisodeLog } from '../definitions/episode-log.js';
import { formatNumber } from '../definitions/describe-value.js';
import { loadEnvironmentFile, type LoadedEnvironment } from '../definitions/load.js';
import { InputError } from '../errors.js';
import type { FiniteMdp } from '../definitions/finite-mdp.js';
import { returnBounds } from '../exact/return-bounds.js';
import { evaluateLog, type EstimatorName, type OffPolicyResult } from './evaluate-log.js';
import { targetOnLog } from './target-on-log.js';

export interface OffPolicyRequest {
  readonly logPath: string;
  readonly policyPath: string;
  readonly envPath: string | null;
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
  readonly result: OffPolicyResult;
  readonly seconds: number;
}

export async function runOffPolicy(request: OffPolicyRequest): Promise<OffPolicyRun> {
  const started = performance.now();
  const env = request.envPath ? await loadEnvironmentFile(request.envPath) : null;
  const log = await readEpisodeLog(request.logPath);
  const facts = environmentFacts(env?.built ?? null);
  const header = log.header;
  const discount = settle('discount', header?.discount, facts.discount, log, request.envPath);
  if (discount === undefined) {
    throw new InputError(log.label, 'does not say its discount: add a first line {"kind": "header", "discount": 0.95, ...} or give --env');
  }
  const horizon = settle('horizon', header?.horizon, facts.horizon, log, request.envPath) ?? null;
  let rewardBounds: readonly [number, number] | null = header?.reward_bounds ?? null;
  if (!rewardBounds && facts.rewardBounds) {
    checkRewardBounds(log, facts.rewardBounds, `${request.envPath}'s`);
    rewardBounds = facts.rewardBounds;
  }
  if (env && env.built.kind !== 'finite') {
    throw new InputError(request.envPath!, 'is a code (module) environment: give a log with a header instead of --env (the target is matched to the log\'s states by name)');
  }
  const target = await targetOnLog(log, request.policyPath, env && env.built.kind === 'finite' ? env.built : null, request.envPath);
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
    maxWeight: null,
  });
  return { log, env, discount, horizon, rewardBounds, returnBounds, result, seconds: (performance.now() - started) / 1000 };
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
