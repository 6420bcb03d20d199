import type { FiniteMdp } from '../../definitions/finite-mdp.js';
import { COLOURS, PLOT_CONFIG, VEGA_LITE_SCHEMA, type PlotSpec, titleLines } from './palette.js';

export interface ValueCell {
  readonly row: number;
  readonly col: number;
  /** The layout character. */
  readonly char: string;
  readonly state: string | null;
  /** null for walls; a terminal's value is 0 (nothing follows it). */
  readonly value: number | null;
  readonly wall: boolean;
  readonly terminal: boolean;
}

/** One cell per layout position with the state's value (e.g. the exact V_H), or null for walls. */
export function valueMapCells(mdp: FiniteMdp, values: ArrayLike<number>): ValueCell[] {
  const grid = mdp.grid;
  if (!grid) return [];
  const cells: ValueCell[] = [];
  for (let r = 0; r < grid.rows; r++) {
    for (let c = 0; c < grid.cols; c++) {
      const i = r * grid.cols + c;
      const state = grid.cellState[i];
      const wall = state < 0;
      cells.push({
        row: r,
        col: c,
        char: grid.cellChar[i],
        state: wall ? null : mdp.stateNames[state],
        value: wall ? null : values[state],
        wall,
        terminal: !wall && mdp.terminal[state] === 1,
      });
    }
  }
  return cells;
}

/**
 * The layout as a grid of squares coloured by value (cividis, a sequential scale readable
 * with colour-vision deficiencies: Nuñez, Anderton & Renslow 2018, PLoS ONE 13:e0199239),
 * each labelled with its value; walls dark grey, terminals white with their layout character
 * and an outline (their value is 0 and would only stretch the scale).
 */
export function valueMapSpec(cells: readonly ValueCell[], labels: { title: string | readonly string[]; subtitle: string; cellSize?: number }): PlotSpec {
  const rows = cells.reduce((m, c) => Math.max(m, c.row + 1), 0);
  const cols = cells.reduce((m, c) => Math.max(m, c.col + 1), 0);
  const size = labels.cellSize ?? Math.max(28, Math.min(56, Math.floor(560 / Math.max(1, cols))));
  const axis = { field: '', type: 'ordinal', axis: null } as const;
  return {
    $schema: VEGA_LITE_SCHEMA,
    title: { text: labels.title, subtitle: titleLines(labels.subtitle), limit: Math.max(cols * size, 420) },
    width: cols * size,
    height: rows * size,
    data: { values: cells },
    encoding: {
      x: { ...axis, field: 'col' },
      y: { ...axis, field: 'row' },
    },
    layer: [
      {
        transform: [{ filter: 'datum.wall' }],
        mark: { type: 'rect', color: '#3b3b3b' },
      },
      {
        transform: [{ filter: 'datum.terminal' }],
        mark: { type: 'rect', color: 'white' },
      },
      {
        transform: [{ filter: '!datum.wall && !datum.terminal' }],
        mark: { type: 'rect', stroke: 'white', strokeWidth: 1 },
        encoding: {
          color: { field: 'value', type: 'quantitative', scale: { scheme: 'cividis' }, title: 'value' },
          tooltip: [{ field: 'state' }, { field: 'char', title: 'cell' }, { field: 'value', type: 'quantitative', format: '.4f' }],
        },
      },
      {
        transform: [{ filter: 'datum.terminal' }],
        mark: { type: 'rect', fill: null, stroke: COLOURS.orange, strokeWidth: 3 },
      },
      {
        transform: [{ filter: '!datum.wall' }],
        mark: { type: 'text', fontSize: Math.max(8, Math.round(size / 4.5)) },
        encoding: {
          text: { field: 'label' },
          color: { condition: { test: 'datum.terminal || datum.value > datum.mid', value: 'black' }, value: 'white' },
        },
      },
    ],
    transform: [
      // The colour scale and the label contrast cover the states one passes through, not terminals.
      { calculate: 'datum.terminal ? null : datum.value', as: 'inner' },
      { joinaggregate: [{ op: 'min', field: 'inner', as: 'lo' }, { op: 'max', field: 'inner', as: 'hi' }] },
      { calculate: '(datum.lo + datum.hi) / 2', as: 'mid' },
      { calculate: "datum.terminal ? datum.char : format(datum.value, '.2f')", as: 'label' },
    ],
    config: PLOT_CONFIG,
  };
}
