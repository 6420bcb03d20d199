import { describe, expect, it } from 'vitest';
import { newBlock } from '../../src/engine/episode-block.js';
import { prepareRollout } from '../../src/engine/prepare.js';
import { runEstimate } from '../../src/evaluate/estimate.js';
import { episodesNeededBetting, modelledEpisodes, RUNNING_INTERSECTION_FACTOR } from '../../src/stats/betting-projection.js';
import { planEpisodes } from '../../src/stats/episode-plan.js';
import { summarize } from '../../src/stats/summary.js';
import { inlineSource, smallGrid, towardsGoal } from '../statistical/small-grid.js';

describe('projected episodes of a betting run', () => {
  it('for targeted bets, untruncated, the model approaches 2 ln(2/α) σ²/ε² (docs/methods.md §6.6: the bet λ = ε/σ² reaches ε there)', () => {
    for (const [sigma, epsilon] of [[0.1, 0.001], [0.3, 0.004]]) {
      const closedForm = (2 * Math.log(40) * sigma * sigma) / (epsilon * epsilon);
      const modelled = modelledEpisodes({ epsilon, mean: 0.5, variance: sigma * sigma, bounds: [0, 1], level: 0.95, schedule: { kind: 'target', halfWidth: epsilon } });
      expect(modelled / closedForm).toBeGreaterThan(0.99);
      expect(modelled / closedForm).toBeLessThan(1.03);
    }
  });

  it('scales with the return range: the same run in other units needs the same episodes', () => {
    const unit = episodesNeededBetting({ epsilon: 0.01, mean: 0.3, variance: 0.04, bounds: [0, 1], level: 0.95, schedule: { kind: 'target', halfWidth: 0.01 } });
    const scaled = episodesNeededBetting({ epsilon: 0.5, mean: -10 + 50 * 0.3, variance: 0.04 * 2500, bounds: [-10, 40], level: 0.95, schedule: { kind: 'target', halfWidth: 0.5 } });
    expect(scaled).toBe(unit);
    expect(unit).toBe(Math.ceil(RUNNING_INTERSECTION_FACTOR * modelledEpisodes({ epsilon: 0.01, mean: 0.3, variance: 0.04, bounds: [0, 1], level: 0.95, schedule: { kind: 'target', halfWidth: 0.01 } })));
  });

  // The rule for plans (this tool's own): within 30% of what a run of that seed then uses. Runs of
  // a few hundred episodes stop with more spread than that; at E = 0.02 runs take 1,300–2,000.
  it('a plan from a 2,000-episode pilot is within 30% of the episodes the run then uses (small grid, E = 0.02, 8 seeds)', async () => {
    const policy = { kind: 'epsilon', epsilon: 0.3, base: towardsGoal };
    const spec = (seed: number) => ({ env: { json: smallGrid, source: inlineSource }, policy: { json: policy, source: inlineSource }, seed, start: '2,0' });
    for (let seed = 1; seed <= 8; seed++) {
      const run = await runEstimate({ spec: spec(seed), episodes: 1_000_000, workers: 1, method: null, level: 0.95, bounds: null, targetError: 0.02 });
      const pilot = await prepareRollout(spec(seed));
      const block = newBlock(0, 2000);
      pilot.runBlock(block);
      const plan = planEpisodes({ pilot: summarize(block.returns), epsilon: 0.02, level: 0.95, bounds: run.bounds });
      const ratio = plan.betting! / run.episodes;
      expect(ratio, `seed ${seed}`).toBeGreaterThan(0.7);
      expect(ratio, `seed ${seed}`).toBeLessThan(1.3);
    }
  });
});
