import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { probabilityOfImprovement, probabilityOfImprovementInterval } from '../../src/stats/probability-of-improvement.js';
import { normalCdf, normalQuantile } from '../../src/stats/quantiles.js';
import { normalSample } from './samples.js';

/** SciPy reference values; generator: fixtures/rank-binomial-scipy.py. */
const scipy = JSON.parse(readFileSync(new URL('./fixtures/rank-binomial-scipy.json', import.meta.url), 'utf8')) as {
  brunner_munzel: Array<{ x: number[]; y: number[]; statistic: number; u_x: number }>;
};

describe('probability of improvement interval', () => {
  it.each(scipy.brunner_munzel)('independent samples: (θ̂ − ½)/se is minus the Brunner–Munzel statistic of scipy.stats.brunnermunzel', ({ x, y, statistic, u_x }) => {
    const level = 0.95;
    const r = probabilityOfImprovementInterval(x, y, level, { resampling: 'independent' });
    expect(r.estimate).toBeCloseTo(u_x / (x.length * y.length), 14);
    const se = (r.interval.high - r.interval.low) / (2 * normalQuantile(0.975)); // no clipping at these values
    expect((r.estimate - 0.5) / se).toBeCloseTo(-statistic, 9);
  });

  it('paired samples under common random numbers: 95% intervals cover the true P(X > Y) (normal theory, common practice)', () => {
    // X = Z + 0.3 + E1, Y = Z + E2 within an episode; across episodes X − Y' ~ N(0.3, 2 + 2·0.25),
    // so P(X > Y') = Φ(0.3/√2.5). 400 runs of 200 pairs: coverage sd ≈ 1.1%.
    const truth = normalCdf(0.3 / Math.sqrt(2.5));
    let covered = 0;
    const runs = 400;
    for (let r = 0; r < runs; r++) {
      const z = normalSample(200, 1000 + r);
      const e1 = normalSample(200, 5000 + r, 0, 0.5);
      const e2 = normalSample(200, 9000 + r, 0, 0.5);
      const x = z.map((v, i) => v + 0.3 + e1[i]);
      const y = z.map((v, i) => v + e2[i]);
      const ci = probabilityOfImprovementInterval(x, y, 0.95).interval;
      if (ci.low <= truth && truth <= ci.high) covered++;
    }
    expect(covered / runs).toBeGreaterThan(0.92);
    expect(covered / runs).toBeLessThan(0.98);
  });

  it('keeps the estimate of probabilityOfImprovement to the bit and stays inside [0, 1]', () => {
    const x = normalSample(50, 3, 2);
    const y = normalSample(50, 4);
    const r = probabilityOfImprovementInterval(x, y, 0.99);
    expect(r.estimate).toBe(probabilityOfImprovement(x, y));
    expect(r.interval.low).toBeGreaterThanOrEqual(0);
    expect(r.interval.high).toBeLessThanOrEqual(1);
  });
});
