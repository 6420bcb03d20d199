/**
 * The model the doubly robust estimators subtract: a tabular maximum-likelihood MDP (mean
 * reward and next-state frequencies of every logged state and action) solved for the target
 * by backward induction into a time-indexed Q̂_t, as a finite horizon needs. Cross-fitted:
 * episode i belongs to fold i mod k, and the values applied to a fold's steps come from the
 * model fitted on the other folds, so Q̂ never depends on the episode it corrects and the
 * doubly robust estimate keeps its unbiasedness (Jiang & Li 2016 assume Q̂ independent of the
 * data; fitting it on the same episodes pulls the estimate toward the model's own, see
 * docs/methods.md §13). Pairs never logged in the fitted folds get reward 0 and next states
 * uniform over the states those folds show.
 */
import { NEXT_TERMINAL, NEXT_UNKNOWN, type EpisodeLog } from '../definitions/episode-log.js';
import type { StepModelValues } from '../stats/off-policy/doubly-robust.js';
import type { TargetOnLog } from './target-on-log.js';

export interface ModelOptions {
  readonly folds: number;
  readonly discount: number;
  /** Steps of the problem's horizon the model looks ahead from t = 0. */
  readonly horizon: number;
}

/** Q̂ and V̂ along every logged step, each from the model fitted without that step's fold. */
export function crossFittedModelValues(log: EpisodeLog, target: TargetOnLog, options: ModelOptions): StepModelValues {
  const n = log.episodeIds.length;
  const folds = Math.max(1, Math.min(options.folds, n));
  const q = new Float64Array(log.state.length);
  const v = new Float64Array(log.state.length);
  for (let fold = 0; fold < folds; fold++) {
    const inFold = (i: number) => i % folds === fold;
    const model = fitModel(log, target.actionNames.length, folds === 1 ? () => true : (i) => !inFold(i));
    applyModel(log, target, model, options, inFold, q, v);
  }
  return { q, v };
}

/** The same values with one model fitted on every episode: biased toward the model; for comparison only. */
export function sameDataModelValues(log: EpisodeLog, target: TargetOnLog, options: Omit<ModelOptions, 'folds'>): StepModelValues {
  return crossFittedModelValues(log, target, { ...options, folds: 1 });
}

interface TabularModel {
  readonly stateCount: number;
  readonly actionCount: number;
  readonly meanReward: Float64Array;
  /** Successors of pair sa in `successorStart[sa] .. successorStart[sa + 1]`; next = stateCount is terminal. */
  readonly successorStart: Int32Array;
  readonly successor: Int32Array;
  readonly successorProbability: Float64Array;
  /**
   * The states the fitted episodes visit or reach: unlogged pairs move uniformly among these,
   * never among states only the corrected episodes show, which would make Q̂ depend on them.
   */
  readonly fittedStates: Int32Array;
}

function fitModel(log: EpisodeLog, actionCount: number, include: (episode: number) => boolean): TabularModel {
  const stateCount = log.stateNames.length;
  const pairs = stateCount * actionCount;
  const rewardSum = new Float64Array(pairs);
  const visits = new Float64Array(pairs);
  const keys: number[] = [];
  const width = stateCount + 1;
  const seen = new Uint8Array(stateCount);
  for (let i = 0; i < log.episodeIds.length; i++) {
    if (!include(i)) continue;
    for (let k = log.episodeStart[i]; k < log.episodeStart[i + 1]; k++) {
      const sa = log.state[k] * actionCount + log.action[k];
      rewardSum[sa] += log.reward[k];
      visits[sa]++;
      seen[log.state[k]] = 1;
      const next = log.nextState[k];
      if (next >= 0) seen[next] = 1;
      if (next !== NEXT_UNKNOWN) keys.push(sa * width + (next === NEXT_TERMINAL ? stateCount : next));
    }
  }
  const sorted = Float64Array.from(keys).sort();
  const successorStart = new Int32Array(pairs + 1);
  const successor: number[] = [];
  const counts: number[] = [];
  for (let j = 0; j < sorted.length; j++) {
    if (j > 0 && sorted[j] === sorted[j - 1]) {
      counts[counts.length - 1]++;
      continue;
    }
    const sa = Math.floor(sorted[j] / width);
    successor.push(sorted[j] - sa * width);
    counts.push(1);
    successorStart[sa + 1]++;
  }
  for (let sa = 0; sa < pairs; sa++) successorStart[sa + 1] += successorStart[sa];
  const successorProbability = new Float64Array(counts.length);
  for (let sa = 0; sa < pairs; sa++) {
    let total = 0;
    for (let e = successorStart[sa]; e < successorStart[sa + 1]; e++) total += counts[e];
    for (let e = successorStart[sa]; e < successorStart[sa + 1]; e++) successorProbability[e] = counts[e] / total;
  }
  const meanReward = new Float64Array(pairs);
  for (let sa = 0; sa < pairs; sa++) meanReward[sa] = visits[sa] > 0 ? rewardSum[sa] / visits[sa] : 0;
  const states: number[] = [];
  seen.forEach((v, state) => {
    if (v) states.push(state);
  });
  const fittedStates = Int32Array.from(states);
  return { stateCount, actionCount, meanReward, successorStart, successor: Int32Array.from(successor), successorProbability, fittedStates };
}

/**
 * Backward induction Q̂_t = r̂ + γ P̂ V̂_{t+1}, V̂_t = Σ_a π Q̂_t, V̂_H = 0 and 0 after a terminal
 * (Sutton & Barto 2018, eq. 4.5 over a finite horizon), writing the values of the chosen
 * steps at their time t as t passes, so no table of every t is kept.
 */
function applyModel(
  log: EpisodeLog,
  target: TargetOnLog,
  model: TabularModel,
  options: ModelOptions,
  chosen: (episode: number) => boolean,
  q: Float64Array,
  v: Float64Array,
): void {
  const { stateCount, actionCount, meanReward, successorStart, successor, successorProbability } = model;
  // The chosen steps grouped by their time t.
  let longest = 0;
  for (let i = 0; i < log.episodeIds.length; i++) longest = Math.max(longest, log.episodeStart[i + 1] - log.episodeStart[i]);
  const horizon = Math.max(options.horizon, longest);
  const atTime: number[][] = Array.from({ length: longest }, () => []);
  for (let i = 0; i < log.episodeIds.length; i++) {
    if (!chosen(i)) continue;
    for (let k = log.episodeStart[i]; k < log.episodeStart[i + 1]; k++) atTime[k - log.episodeStart[i]].push(k);
  }
  let nextValue = new Float64Array(stateCount + 1); // V̂_{t+1}; the last entry (terminal) stays 0
  let value = new Float64Array(stateCount + 1);
  const qt = new Float64Array(stateCount * actionCount);
  for (let t = horizon - 1; t >= 0; t--) {
    let uniformNext = 0;
    for (const s of model.fittedStates) uniformNext += nextValue[s];
    uniformNext /= Math.max(1, model.fittedStates.length);
    for (let s = 0; s < stateCount; s++) {
      let vs = 0;
      for (let a = 0; a < actionCount; a++) {
        const sa = s * actionCount + a;
        let ahead: number;
        if (successorStart[sa] === successorStart[sa + 1]) ahead = uniformNext;
        else {
          ahead = 0;
          for (let e = successorStart[sa]; e < successorStart[sa + 1]; e++) ahead += successorProbability[e] * nextValue[successor[e]];
        }
        const value_sa = meanReward[sa] + options.discount * ahead;
        qt[sa] = value_sa;
        vs += target.probability[sa] * value_sa;
      }
      value[s] = vs;
    }
    value[stateCount] = 0;
    if (t < longest) {
      for (const k of atTime[t]) {
        q[k] = qt[log.state[k] * actionCount + log.action[k]];
        v[k] = value[log.state[k]];
      }
    }
    [nextValue, value] = [value, nextValue];
  }
}
