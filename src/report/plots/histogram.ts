import { sortedQuantile } from '../../stats/index.js';
import { COLOURS, PLOT_CONFIG, VEGA_LITE_SCHEMA, type PlotSpec } from './palette.js';

export interface HistogramBin {
  /** Left edge (inclusive). */
  readonly start: number;
  /** Right edge (exclusive, except the last bin's). */
  readonly end: number;
  readonly count: number;
}

const MAX_BINS = 120;
/** Up to this many whole-number values in range, each gets its own bar. */
const INTEGER_BARS = 60;

/**
 * Counts in equal-width bins. Width by the Freedman–Diaconis rule h = 2·IQR·n^(−1/3)
 * (Freedman & Diaconis 1981, Z. Wahrscheinlichkeitstheorie verw. Gebiete 57:453–476), which
 * resists long tails; when the IQR is 0 (most returns equal), Sturges' ⌈log₂ n⌉ + 1 bins over
 * the range (Sturges 1926, JASA 21:65–66). `integer` values (episode lengths) get whole-number
 * widths and edges at k − 0.5, so each bar covers whole lengths: width 1 when at most 60
 * values are in range, else the rule's width rounded up. Binned here, not in the plot,
 * so a spec carries at most 120 bars however many episodes a run has.
 */
export function histogramBins(values: ArrayLike<number>, options: { integer?: boolean } = {}): HistogramBin[] {
  const n = values.length;
  if (n === 0) return [];
  const sorted = Float64Array.from(values).sort();
  const min = sorted[0];
  const max = sorted[n - 1];
  if (min === max) {
    const half = options.integer ? 0.5 : Math.max(Math.abs(min) * 1e-3, 1e-9);
    return [{ start: min - half, end: max + half, count: n }];
  }
  const iqr = sortedQuantile(sorted, 0.75) - sortedQuantile(sorted, 0.25);
  let width = iqr > 0 ? 2 * iqr * Math.cbrt(1 / n) : (max - min) / (Math.ceil(Math.log2(n)) + 1);
  width = Math.max(width, (max - min) / MAX_BINS);
  let start = min;
  if (options.integer) {
    // Few distinct lengths: one bar each, so none is merged with its neighbour.
    width = max - min + 1 <= INTEGER_BARS ? 1 : Math.max(1, Math.ceil(width));
    start = min - 0.5;
  }
  const bins = Math.max(1, Math.ceil((max - start) / width + (options.integer ? 0 : 1e-12)));
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < n; i++) counts[Math.min(bins - 1, Math.floor((sorted[i] - start) / width))]++;
  return counts.map((count, k) => ({ start: start + k * width, end: start + (k + 1) * width, count }));
}

export interface HistogramLabels {
  readonly title: string | readonly string[];
  readonly xTitle: string;
  /** A vertical reference line (e.g. the mean), with its name. */
  readonly marker?: { readonly value: number; readonly label: string } | null;
  readonly colour?: string;
  readonly width?: number;
  readonly height?: number;
}

export function histogramSpec(bins: readonly HistogramBin[], labels: HistogramLabels): PlotSpec {
  const layers: PlotSpec[] = [
    {
      mark: { type: 'rect', color: labels.colour ?? COLOURS.green, stroke: 'white', strokeWidth: 0.5 },
      encoding: {
        x: { field: 'start', type: 'quantitative', title: labels.xTitle, scale: { zero: false } },
        x2: { field: 'end' },
        y: { field: 'count', type: 'quantitative', title: 'episodes' },
        tooltip: [
          { field: 'start', type: 'quantitative', format: '.4~f', title: 'from' },
          { field: 'end', type: 'quantitative', format: '.4~f', title: 'to' },
          { field: 'count', type: 'quantitative', format: ',' },
        ],
      },
    },
  ];
  if (labels.marker && Number.isFinite(labels.marker.value)) {
    layers.push({
      data: { values: [{ value: labels.marker.value, label: labels.marker.label }] },
      mark: { type: 'rule', color: COLOURS.black, strokeDash: [4, 3] },
      encoding: { x: { field: 'value', type: 'quantitative' }, tooltip: [{ field: 'label' }, { field: 'value', format: '.4f' }] },
    });
  }
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: { text: labels.title, subtitle: labels.marker ? `dashed: ${labels.marker.label}` : '', limit: labels.width ?? 560 },
    width: labels.width ?? 560,
    height: labels.height ?? 220,
    data: { values: bins },
    layer: layers,
    config: PLOT_CONFIG,
  };
}
