/** The `offpolicy --json` object (snake_case keys), also what a stored off-policy run shows. */
import { ESTIMATOR_TITLES } from '../offpolicy/evaluate-log.js';
import type { OffPolicyRun } from '../offpolicy/run-offpolicy.js';

export interface OffPolicyLabels {
  readonly log: string;
  readonly policy: string;
  readonly env: string | null;
  readonly seed: number;
}

const pair = (p: readonly [number, number] | null) => (p ? { low: finite(p[0]), high: finite(p[1]) } : null);
const finite = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? null : x);

/** What `offpolicy --json` prints and the store keeps as the run's summary. */
export type OffPolicyJson = ReturnType<typeof offPolicyJson>;

export function offPolicyJson(run: Pick<OffPolicyRun, 'log' | 'discount' | 'horizon' | 'rewardBounds' | 'returnBounds' | 'maxWeight' | 'result' | 'seconds'> & { maxWeightSource?: OffPolicyRun['maxWeightSource'] }, labels: OffPolicyLabels, runId: string | null = null) {
  const { result, log } = run;
  const d = result.diagnostics;
  return {
    kind: 'offpolicy',
    run_id: runId,
    log: { path: labels.log, sha256: log.sha256, bytes: log.bytes, episodes: result.episodes, steps: result.steps },
    policy: labels.policy,
    env: labels.env,
    discount: run.discount,
    horizon: run.horizon,
    reward_bounds: run.rewardBounds,
    return_bounds: run.returnBounds,
    max_weight: run.maxWeight,
    max_weight_source: run.maxWeightSource ?? (run.maxWeight === null ? null : 'behaviour'),
    level: result.level,
    seed: labels.seed,
    resamples: result.resamples,
    folds: result.folds,
    estimates: result.estimators.map((e) => ({
      name: e.name,
      title: ESTIMATOR_TITLES[e.name],
      estimate: finite(e.estimate),
      resamples: e.resamples,
      intervals: {
        bootstrap: pair(e.intervals.bootstrap),
        bootstrap_percentile: pair(e.intervals.bootstrapPercentile),
        t: pair(e.intervals.t),
      },
    })),
    bounds: result.bounds.map((b) => ({
      method: b.method,
      low: finite(b.low),
      high: finite(b.high),
      threshold: b.threshold !== undefined ? finite(b.threshold) : undefined,
      held_out: b.heldOut,
      note: b.note,
    })),
    diagnostics: {
      ess: d.ess,
      ess_fraction: d.essFraction,
      step_ess: Array.from(d.stepEss),
      step_mean_weight: Array.from(d.stepMeanWeight),
      mean_weight: d.meanWeight,
      mean_weight_interval: pair(d.meanWeightInterval),
      max_weight: d.maxWeight,
      max_weight_share: finite(d.maxWeightShare),
      zero_weight_fraction: d.zeroWeightFraction,
      unlogged_action_states: d.unloggedActionStates,
      warnings: d.warnings,
      verdict: d.verdict,
    },
    seconds: run.seconds,
  };
}
