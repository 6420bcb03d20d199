/**
 * The off-policy estimators against values computed outside reckon: scripts/methods/off_policy.py
 * evaluates the published formulas (Precup, Sutton & Singh 2000; Thomas 2015; Jiang & Li 2016;
 * Thomas & Brunskill 2016; Kish 1965) with numpy on the 2-state example of docs/methods.md §13.
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readEpisodeLog } from '../../src/definitions/episode-log.js';
import { targetOnLog } from '../../src/offpolicy/target-on-log.js';
import { weightedEpisodes } from '../../src/offpolicy/weights-on-log.js';
import { consistentWeightedPerDecision } from '../../src/stats/off-policy/consistent-weighted-per-decision.js';
import { doublyRobustValues, type StepModelValues } from '../../src/stats/off-policy/doubly-robust.js';
import { importanceSamplingValues } from '../../src/stats/off-policy/importance-sampling.js';
import { kishEffectiveSampleSize } from '../../src/stats/off-policy/kish-effective-sample-size.js';
import { perDecisionValues } from '../../src/stats/off-policy/per-decision-importance-sampling.js';
import { weightedDoublyRobust } from '../../src/stats/off-policy/weighted-doubly-robust.js';
import { finalWeights, type WeightedEpisodes } from '../../src/stats/off-policy/weighted-episodes.js';
import { weightedImportanceSampling } from '../../src/stats/off-policy/weighted-importance-sampling.js';
import { TWO_STATE, twoStateQ, twoStateTrajectories } from './two-state.js';

const FIXTURES = path.resolve(__dirname, '../fixtures/off-policy');
const mean = (x: Float64Array) => x.reduce((a, b) => a + b, 0) / x.length;

/** Q^π_t(s_t, a_t) and V^π_t(s_t) along the log's steps (log states and actions are "0", "1"). */
function exactModelOnSteps(states: Int32Array, actions: Int32Array, episodeStart: Int32Array): StepModelValues {
  const q = new Float64Array(states.length);
  const v = new Float64Array(states.length);
  const table = twoStateQ(TWO_STATE.target);
  for (let i = 0; i + 1 < episodeStart.length; i++) {
    for (let k = episodeStart[i]; k < episodeStart[i + 1]; k++) {
      const t = k - episodeStart[i];
      const s = states[k];
      q[k] = table[t][s][actions[k]];
      v[k] = TWO_STATE.target[s][0] * table[t][s][0] + TWO_STATE.target[s][1] * table[t][s][1];
    }
  }
  return { q, v };
}

describe('the 3-episode log (scripts/methods/off_policy.py, "3-episode log")', async () => {
  const log = await readEpisodeLog(path.join(FIXTURES, 'three-episodes.jsonl'));
  const target = await targetOnLog(log, path.join(FIXTURES, 'two-state-target.json'), null, null);
  const episodes = weightedEpisodes(log, target, 0.9);
  // log state/action names "0", "1" appear in that order, so indices equal the names
  const model = exactModelOnSteps(log.state, log.action, log.episodeStart);

  it('has the weights and returns the script prints', () => {
    const w = finalWeights(episodes);
    expect(w[0]).toBeCloseTo(0.96, 6);
    expect(w[1]).toBeCloseTo(1.371429, 6);
    expect(w[2]).toBeCloseTo(18.962963, 6);
  });
  it('IS, WIS, PDIS, CWPDIS', () => {
    expect(mean(importanceSamplingValues(episodes))).toBeCloseTo(4.360147, 6);
    expect(weightedImportanceSampling(episodes)).toBeCloseTo(0.614267, 6);
    expect(mean(perDecisionValues(episodes))).toBeCloseTo(3.791822, 6);
    expect(consistentWeightedPerDecision(episodes)).toBeCloseTo(0.857224, 6);
  });
  it('DR and WDR with Q̂ = Q^π', () => {
    expect(mean(doublyRobustValues(episodes, model))).toBeCloseTo(0.103233, 6);
    expect(weightedDoublyRobust(episodes, model)).toBeCloseTo(0.950364, 6);
  });
  it('Kish effective sample size', () => {
    expect(kishEffectiveSampleSize(finalWeights(episodes))).toBeCloseTo(1.251257, 6);
  });
  it('DR with Q̂ = 0 is PDIS, and WDR with Q̂ = 0 is CWPDIS (Jiang & Li 2016; Thomas & Brunskill 2016: common practice)', () => {
    const zero = { q: new Float64Array(9), v: new Float64Array(9) };
    expect(mean(doublyRobustValues(episodes, zero))).toBeCloseTo(mean(perDecisionValues(episodes)), 12);
    expect(weightedDoublyRobust(episodes, zero)).toBeCloseTo(consistentWeightedPerDecision(episodes), 12);
  });
});

describe('exact expectations on the 2-state example by enumeration (scripts/methods/off_policy.py, "n = 1, 2")', () => {
  const trajectories = twoStateTrajectories();
  /** One WeightedEpisodes of the given trajectories. */
  function combine(list: number[]): { episodes: WeightedEpisodes; model: StepModelValues } {
    const steps = list.length * 3;
    const episodeStart = Int32Array.from({ length: list.length + 1 }, (_, i) => 3 * i);
    const reward = new Float64Array(steps);
    const weight = new Float64Array(steps);
    const states = new Int32Array(steps);
    const actions = new Int32Array(steps);
    list.forEach((j, i) => {
      const tr = trajectories[j];
      for (let t = 0; t < 3; t++) {
        reward[3 * i + t] = tr.reward[t];
        weight[3 * i + t] = tr.weight[t];
        states[3 * i + t] = tr.states[t];
        actions[3 * i + t] = tr.actions[t];
      }
    });
    return { episodes: { episodeStart, reward, weight, discount: 0.9 }, model: exactModelOnSteps(states, actions, episodeStart) };
  }
  function expectations(n: number): Record<string, number> {
    const sums: Record<string, number> = { IS: 0, WIS: 0, PDIS: 0, CWPDIS: 0, DR: 0, WDR: 0 };
    const count = trajectories.length ** n;
    for (let code = 0; code < count; code++) {
      const list: number[] = [];
      let p = 1;
      for (let i = 0, c = code; i < n; i++, c = Math.floor(c / trajectories.length)) {
        list.push(c % trajectories.length);
        p *= trajectories[c % trajectories.length].probability;
      }
      const { episodes, model } = combine(list);
      sums.IS += p * mean(importanceSamplingValues(episodes));
      sums.WIS += p * weightedImportanceSampling(episodes);
      sums.PDIS += p * mean(perDecisionValues(episodes));
      sums.CWPDIS += p * consistentWeightedPerDecision(episodes);
      sums.DR += p * mean(doublyRobustValues(episodes, model));
      sums.WDR += p * weightedDoublyRobust(episodes, model);
    }
    return sums;
  }
  it('n = 1: the unbiased estimators give V^π = 1.340125, the weighted ones V^μ = 0.6342495', () => {
    const e = expectations(1);
    for (const k of ['IS', 'PDIS', 'DR', 'WDR']) expect(e[k], k).toBeCloseTo(1.340125, 6);
    expect(e.WIS).toBeCloseTo(0.6342495, 7);
    expect(e.CWPDIS).toBeCloseTo(0.6342495, 7);
  });
  it('n = 2: E[WIS] = 0.823313, E[CWPDIS] = 0.843136, the rest 1.340125', () => {
    const e = expectations(2);
    expect(e.WIS).toBeCloseTo(0.823313, 6);
    expect(e.CWPDIS).toBeCloseTo(0.843136, 6);
    for (const k of ['IS', 'PDIS', 'DR', 'WDR']) expect(e[k], k).toBeCloseTo(1.340125, 6);
  });
});

describe('a module target policy with probabilities(state)', () => {
  it('is matched to the logged states by name and gives the same estimates as the table (scripts/methods/off_policy.py, "3-episode log")', async () => {
    const { tempFiles } = await import('../cli/run-cli.js');
    const dir = tempFiles({
      'target.js': `export default () => ({
        act: () => '1',
        probabilities: (state) => (state === '0' ? { '0': 0.2, '1': 0.8 } : { '0': 0.1, '1': 0.9 }),
      });\n`,
      'target.json': { kind: 'module', path: './target.js' },
    });
    const log = await readEpisodeLog(path.join(FIXTURES, 'three-episodes.jsonl'));
    const target = await targetOnLog(log, path.join(dir, 'target.json'), null, null);
    const episodes = weightedEpisodes(log, target, 0.9);
    expect(mean(importanceSamplingValues(episodes))).toBeCloseTo(4.360147, 6);
    expect(consistentWeightedPerDecision(episodes)).toBeCloseTo(0.857224, 6);
  });
});
