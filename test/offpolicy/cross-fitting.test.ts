/**
 * Cross-fitting keeps DR unbiased (Jiang & Li 2016 require Q̂ independent of the episode it
 * corrects): on the 2-state example, the exact expectation over all 32² logs of two episodes of
 * DR with 2-fold cross-fitting (each episode's model fitted on the other) is V^π = 1.340125
 * (scripts/methods/off_policy.py), while the model fitted on both episodes pulls it away.
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseEpisodeLog } from '../../src/definitions/episode-log.js';
import { crossFittedModelValues, sameDataModelValues } from '../../src/offpolicy/cross-fitted-model.js';
import { targetOnLog } from '../../src/offpolicy/target-on-log.js';
import { weightedEpisodes } from '../../src/offpolicy/weights-on-log.js';
import { doublyRobustValues } from '../../src/stats/off-policy/doubly-robust.js';
import { TWO_STATE, twoStateTrajectories } from './two-state.js';

const TARGET = path.resolve(__dirname, '../fixtures/off-policy/two-state-target.json');
const HEADER = JSON.stringify({ kind: 'header', discount: 0.9, reward_bounds: [0, 1], horizon: 3, actions: ['0', '1'] });

describe('cross-fitted DR', () => {
  it('is exactly unbiased over all logs of two episodes; the same-data fit is not', async () => {
    const trajectories = twoStateTrajectories();
    let crossFitted = 0;
    let sameData = 0;
    let total = 0;
    for (let a = 0; a < trajectories.length; a++) {
      for (let b = 0; b < trajectories.length; b++) {
        const lines = [HEADER];
        [a, b].forEach((j, episode) => {
          const tr = trajectories[j];
          for (let t = 0; t < 3; t++) {
            const s = tr.states[t];
            const act = tr.actions[t];
            lines.push(JSON.stringify({ episode, t, state: String(s), action: String(act), reward: TWO_STATE.reward[s][act], behaviour_prob: TWO_STATE.behaviour[s][act], end: t === 2 ? 'truncated' : null }));
          }
        });
        const log = parseEpisodeLog(lines.join('\n'), 'log.jsonl');
        const target = await targetOnLog(log, TARGET, null, null);
        const episodes = weightedEpisodes(log, target, 0.9);
        const p = trajectories[a].probability * trajectories[b].probability;
        const dr = (model: { q: Float64Array; v: Float64Array }) => {
          const values = doublyRobustValues(episodes, model);
          return (values[0] + values[1]) / 2;
        };
        crossFitted += p * dr(crossFittedModelValues(log, target, { folds: 2, discount: 0.9, horizon: 3 }));
        sameData += p * dr(sameDataModelValues(log, target, { discount: 0.9, horizon: 3 }));
        total += p;
      }
    }
    expect(total).toBeCloseTo(1, 12);
    expect(crossFitted).toBeCloseTo(1.340125, 6);
    expect(Math.abs(sameData - 1.340125)).toBeGreaterThan(0.05);
  });
});
