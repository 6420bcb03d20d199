import { COLOURS, PLOT_CONFIG, VEGA_LITE_SCHEMA, type PlotSpec } from './palette.js';

export interface DifferenceRow {
  /** "A − B". */
  readonly pair: string;
  readonly mean: number;
  readonly low: number;
  readonly high: number;
}

/**
 * Every pair's difference with its interval on one axis, with zero marked: an interval that
 * does not cross the line is a difference the data resolve at that level.
 */
export function differencesSpec(rows: readonly DifferenceRow[], labels: { title: string; subtitle: string }): PlotSpec {
  const encodingY = { field: 'pair', type: 'nominal', title: null, sort: null, axis: { labelLimit: 360 } };
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: { text: labels.title, subtitle: labels.subtitle },
    width: 560,
    height: Math.max(60, 42 * rows.length),
    data: { values: rows },
    layer: [
      {
        data: { values: [{ zero: 0 }] },
        mark: { type: 'rule', color: COLOURS.grey, strokeDash: [4, 3] },
        encoding: { x: { field: 'zero', type: 'quantitative' } },
      },
      {
        mark: { type: 'rule', color: COLOURS.blue, strokeWidth: 3 },
        encoding: {
          y: encodingY,
          x: { field: 'low', type: 'quantitative', title: 'difference in mean return (first − second)' },
          x2: { field: 'high' },
        },
      },
      {
        mark: { type: 'point', filled: true, size: 70, color: COLOURS.vermillion },
        encoding: {
          y: encodingY,
          x: { field: 'mean', type: 'quantitative' },
          tooltip: [
            { field: 'pair' },
            { field: 'mean', type: 'quantitative', format: '.4f' },
            { field: 'low', type: 'quantitative', format: '.4f' },
            { field: 'high', type: 'quantitative', format: '.4f' },
          ],
        },
      },
    ],
    config: PLOT_CONFIG,
  };
}
