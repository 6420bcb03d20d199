import { dkwEpsilon } from '../../stats/dkw.js';
import { COLOURS, PLOT_CONFIG, VEGA_LITE_SCHEMA, type PlotSpec, titleLines } from './palette.js';

export interface CdfPoint {
  readonly return: number;
  /** F_n at this return (right-continuous step). */
  readonly cdf: number;
  readonly low: number;
  readonly high: number;
}

/** Points of the empirical CDF drawn at most. */
const MAX_POINTS = 400;

/**
 * The empirical CDF of the returns with its DKW band F_n ± ε (Dvoretzky, Kiefer & Wolfowitz
 * 1956; Massart 1990), clipped to [0, 1]: with the stated confidence the true CDF lies inside the
 * band everywhere at once. Thinned to at most 400 steps, always keeping the first and last
 * return, so a plot stays light whatever n.
 */
export function cdfSeries(returns: Float64Array, level: number): CdfPoint[] {
  const n = returns.length;
  if (n === 0) return [];
  const sorted = Float64Array.from(returns).sort();
  const epsilon = dkwEpsilon(n, level);
  // one step per distinct return: the last index of each run of equal returns carries its height
  const steps: number[] = [];
  for (let i = 0; i < n; i++) if (i === n - 1 || sorted[i + 1] !== sorted[i]) steps.push(i);
  const stride = Math.max(1, Math.ceil(steps.length / MAX_POINTS));
  const kept = steps.filter((_, k) => k % stride === 0 || k === steps.length - 1);
  // the step rises from 0 at the smallest return
  const points: CdfPoint[] = [{ return: sorted[0], cdf: 0, low: 0, high: Math.min(1, epsilon) }];
  for (const i of kept) {
    const cdf = (i + 1) / n;
    points.push({ return: sorted[i], cdf, low: Math.max(0, cdf - epsilon), high: Math.min(1, cdf + epsilon) });
  }
  return points;
}

export function cdfSpec(series: readonly CdfPoint[], labels: { title: string | readonly string[]; level: number; width?: number; height?: number }): PlotSpec {
  const percent = `${+(labels.level * 100).toFixed(2)}%`;
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: { text: labels.title, subtitle: titleLines(`step: share of episodes with return ≤ x; band: ${percent} DKW band, holding for every x at once`), limit: labels.width ?? 560 },
    width: labels.width ?? 560,
    height: labels.height ?? 280,
    data: { values: series },
    layer: [
      {
        mark: { type: 'area', color: COLOURS.orange, opacity: 0.3, interpolate: 'step-after' },
        encoding: {
          x: { field: 'return', type: 'quantitative', scale: { zero: false }, title: 'discounted return' },
          y: { field: 'low', type: 'quantitative', scale: { domain: [0, 1] }, title: 'P(return ≤ x)' },
          y2: { field: 'high' },
        },
      },
      {
        mark: { type: 'line', color: COLOURS.vermillion, strokeWidth: 2, interpolate: 'step-after' },
        encoding: {
          x: { field: 'return', type: 'quantitative' },
          y: { field: 'cdf', type: 'quantitative' },
          tooltip: [
            { field: 'return', type: 'quantitative', format: '.4f' },
            { field: 'cdf', type: 'quantitative', format: '.4f' },
          ],
        },
      },
    ],
    config: PLOT_CONFIG,
  };
}
