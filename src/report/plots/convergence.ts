import { tQuantile, type RunningInterval } from '../../stats/index.js';
import { COLOURS, PLOT_CONFIG, VEGA_LITE_SCHEMA, type PlotSpec, titleLines } from './palette.js';

export interface ConvergencePoint {
  /** Episodes averaged so far. */
  readonly episodes: number;
  readonly mean: number;
  readonly low: number;
  readonly high: number;
}

/**
 * Running mean and a pointwise t-interval after n episodes, at about `points` values of n
 * spaced evenly on a log scale (2 … N, N always included), so a plot stays light whatever N.
 * One pass with Welford's update (Welford 1962, Technometrics 4:419–420). The band is a
 * fixed-n interval at each n, not a confidence sequence: it is a picture of convergence,
 * not a licence to stop when it looks narrow (README, "The statistics").
 */
export function convergenceSeries(returns: Float64Array, level: number, points = 160): ConvergencePoint[] {
  const n = returns.length;
  const out: ConvergencePoint[] = [];
  if (n < 2) return out;
  const checkpoints = logCheckpoints(n, points);
  let next = 0;
  let mean = 0;
  let m2 = 0;
  for (let i = 0; i < n; i++) {
    const x = returns[i];
    const count = i + 1;
    const delta = x - mean;
    mean += delta / count;
    m2 += delta * (x - mean);
    if (count === checkpoints[next]) {
      next++;
      const half = tQuantile(1 - (1 - level) / 2, count - 1) * Math.sqrt(m2 / (count - 1) / count);
      out.push({ episodes: count, mean, low: mean - half, high: mean + half });
    }
  }
  return out;
}

/**
 * Running mean and the run's own confidence sequence after n episodes, at the same log-spaced
 * n as {@link convergenceSeries}: for a run that stopped at a target error this is the
 * interval it stopped on, valid at every n at once, not a fixed-n band.
 */
export function sequenceSeries(returns: Float64Array, sequence: RunningInterval, points = 160): ConvergencePoint[] {
  const out: ConvergencePoint[] = [];
  const checkpoints = logCheckpoints(returns.length, points);
  let done = 0;
  let sum = 0;
  for (const n of checkpoints) {
    const chunk = returns.subarray(done, n);
    sequence.add(chunk);
    for (let i = 0; i < chunk.length; i++) sum += chunk[i];
    done = n;
    const interval = sequence.interval();
    out.push({ episodes: n, mean: sum / n, low: interval.low, high: interval.high });
  }
  return out;
}

/** Distinct integers from 2 to n, about `points` of them, evenly spaced in log n. */
export function logCheckpoints(n: number, points: number): number[] {
  const result: number[] = [];
  if (n < 2) return result;
  const steps = Math.max(1, points - 1);
  const ratio = Math.log(n / 2) / steps;
  let last = 0;
  for (let k = 0; k <= steps; k++) {
    const value = k === steps ? n : Math.round(2 * Math.exp(ratio * k));
    if (value > last && value <= n) {
      result.push(value);
      last = value;
    }
  }
  return result;
}

export interface ConvergenceLabels {
  readonly title: string | readonly string[];
  readonly level: number;
  /** The exact value, drawn as a reference line when known. */
  readonly exact?: number | null;
  readonly width?: number;
  readonly height?: number;
  /** The band's name when it is the run's confidence sequence; absent: a pointwise t band. */
  readonly sequence?: string;
}

/** Running mean against episodes (log axis) with its interval band, and the exact value if known. */
export function convergenceSpec(series: readonly ConvergencePoint[], labels: ConvergenceLabels): PlotSpec {
  const percent = `${+(labels.level * 100).toFixed(2)}%`;
  const layers: PlotSpec[] = [
    {
      mark: { type: 'area', color: COLOURS.skyBlue, opacity: 0.35 },
      encoding: {
        x: { field: 'episodes', type: 'quantitative', scale: { type: 'log', nice: false }, title: 'episodes (log scale)' },
        y: { field: 'low', type: 'quantitative', scale: { zero: false }, title: 'running mean return' },
        y2: { field: 'high' },
      },
    },
    {
      mark: { type: 'line', color: COLOURS.blue, strokeWidth: 2 },
      encoding: {
        x: { field: 'episodes', type: 'quantitative' },
        y: { field: 'mean', type: 'quantitative' },
        tooltip: [
          { field: 'episodes', type: 'quantitative', format: ',' },
          { field: 'mean', type: 'quantitative', format: '.4f' },
          { field: 'low', type: 'quantitative', format: '.4f' },
          { field: 'high', type: 'quantitative', format: '.4f' },
        ],
      },
    },
  ];
  if (labels.exact !== undefined && labels.exact !== null && Number.isFinite(labels.exact)) {
    layers.push({
      data: { values: [{ exact: labels.exact }] },
      mark: { type: 'rule', color: COLOURS.vermillion, strokeDash: [6, 4], strokeWidth: 1.5 },
      encoding: { y: { field: 'exact', type: 'quantitative' } },
    });
  }
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: {
      text: labels.title,
      // Long titles are cut to the plot's width (with …) rather than widening the figure.
      limit: labels.width ?? 560,
      subtitle: titleLines(
        `line: mean of the first n returns; band: ${labels.sequence ? `the run's ${percent} ${labels.sequence} confidence sequence (valid at every n at once)` : `${percent} t-interval at each n`}` +
          (labels.exact != null ? '; dashed: exact value' : ''),
      ),
    },
    width: labels.width ?? 560,
    height: labels.height ?? 280,
    data: { values: series },
    layer: layers,
    config: PLOT_CONFIG,
  };
}
