import { COLOURS, PLOT_CONFIG, VEGA_LITE_SCHEMA, type PlotSpec } from './palette.js';

export interface GroupPlotRow {
  /** The row's label: a member's name, or "NAME: group mean". */
  readonly row: string;
  readonly group: string;
  /** `member` (an interval from its episodes) or `group` (the interval over seeds). */
  readonly kind: 'member' | 'group';
  readonly mean: number;
  readonly low: number;
  readonly high: number;
}

/**
 * One dot per member with its episode-noise interval, and under each group's members the
 * group mean with its interval over seeds: when the members' intervals are short and scattered,
 * seeds, not episodes, set the group's uncertainty.
 */
export function groupMembersSpec(rows: readonly GroupPlotRow[], labels: { title: string; subtitle: string }): PlotSpec {
  const y = { field: 'row', type: 'nominal', title: null, sort: null, axis: { labelLimit: 360 } };
  const colour = {
    field: 'kind',
    type: 'nominal',
    title: null,
    scale: { domain: ['member', 'group'], range: [COLOURS.blue, COLOURS.vermillion] },
    legend: { orient: 'bottom', labelExpr: "datum.label === 'member' ? 'member (episodes only)' : 'group mean (over seeds)'" },
  };
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: { text: labels.title, subtitle: labels.subtitle },
    width: 560,
    height: Math.max(80, 22 * rows.length),
    data: { values: rows },
    layer: [
      {
        mark: { type: 'rule', strokeWidth: 3 },
        encoding: { y, x: { field: 'low', type: 'quantitative', title: 'expected return', scale: { zero: false } }, x2: { field: 'high' }, color: colour },
      },
      {
        mark: { type: 'point', filled: true, size: 60 },
        encoding: {
          y,
          x: { field: 'mean', type: 'quantitative' },
          color: colour,
          tooltip: [
            { field: 'row' },
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
