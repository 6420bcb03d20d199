import type { FiniteMdp, PolicyMatrix } from '../../definitions/finite-mdp.js';
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
  /** Whether an episode can start here (the start distribution, or the run's `--start`). */
  readonly start: boolean;
  /** For a portal, the layout character it jumps to. */
  readonly portal: string | null;
  /** The policy's most probable move(s) as arrows (`*`: every move alike); null without a policy, on walls and terminals. */
  readonly arrow: string | null;
}

/** Arrows for the gridworld's actions, in its action order: up, down, left, right. */
const ARROWS: Record<string, string> = { up: '↑', down: '↓', left: '←', right: '→' };

/** The moves a policy gives the highest probability in state s, as arrows; `*` when every move ties. */
function arrowOf(mdp: FiniteMdp, policy: PolicyMatrix, s: number): string {
  const k = mdp.actionCount;
  let best = -1;
  for (let a = 0; a < k; a++) best = Math.max(best, policy.probability[s * k + a]);
  const top: string[] = [];
  for (let a = 0; a < k; a++) if (policy.probability[s * k + a] >= best - 1e-12) top.push(ARROWS[mdp.actionNames[a]] ?? mdp.actionNames[a]);
  return top.length === k && k > 1 ? '*' : top.join('');
}

/**
 * One cell per layout position with the state's value (e.g. the exact V_H), or null for walls;
 * start cells and portals marked, and with a policy, the moves it prefers in each cell.
 */
export function valueMapCells(mdp: FiniteMdp, values: ArrayLike<number>, options: { policy?: PolicyMatrix | null; start?: number | null } = {}): ValueCell[] {
  const grid = mdp.grid;
  if (!grid) return [];
  const cells: ValueCell[] = [];
  for (let r = 0; r < grid.rows; r++) {
    for (let c = 0; c < grid.cols; c++) {
      const i = r * grid.cols + c;
      const state = grid.cellState[i];
      const wall = state < 0;
      const terminal = !wall && mdp.terminal[state] === 1;
      const start = !wall && (options.start === null || options.start === undefined ? mdp.startProbability[state] > 0 : options.start === state);
      cells.push({
        row: r,
        col: c,
        char: grid.cellChar[i],
        state: wall ? null : mdp.stateNames[state],
        value: wall ? null : values[state],
        wall,
        terminal,
        start,
        portal: grid.portalTo?.[i] ?? null,
        arrow: options.policy && !wall && !terminal && !grid.portalTo?.[i] ? arrowOf(mdp, options.policy, state) : null,
      });
    }
  }
  return cells;
}

/**
 * The layout as a grid of squares coloured by value (cividis, a sequential scale readable
 * with colour-vision deficiencies: Nuñez, Anderton & Renslow 2018, PLoS ONE 13:e0199239),
 * each labelled with its value; walls dark grey, terminals white with their layout character
 * and an outline (their value is 0 and would only stretch the scale). Start cells carry an S,
 * portals the cell they jump to (↪a), and, when asked, each cell the policy's preferred moves.
 */
export function valueMapSpec(cells: readonly ValueCell[], labels: { title: string | readonly string[]; subtitle: string; cellSize?: number }): PlotSpec {
  const rows = cells.reduce((m, c) => Math.max(m, c.row + 1), 0);
  const cols = cells.reduce((m, c) => Math.max(m, c.col + 1), 0);
  const size = labels.cellSize ?? Math.max(28, Math.min(56, Math.floor(560 / Math.max(1, cols))));
  const axis = { field: '', type: 'ordinal', axis: null } as const;
  const corner = Math.max(8, Math.round(size / 5));
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
      // Start cells: a marker in the top-left corner; portals: where they jump, top right.
      {
        transform: [{ filter: 'datum.start' }],
        mark: { type: 'text', text: 'S', fontWeight: 'bold', fontSize: corner, dx: -size / 2 + corner * 0.7, dy: -size / 2 + corner * 0.8, color: COLOURS.vermillion },
      },
      {
        transform: [{ filter: 'datum.portal !== null' }],
        mark: { type: 'text', fontWeight: 'bold', fontSize: corner, dx: size / 2 - corner * 1.1, dy: -size / 2 + corner * 0.8, color: COLOURS.skyBlue },
        encoding: { text: { field: 'portalLabel' } },
      },
      {
        transform: [{ filter: 'datum.arrow !== null' }],
        mark: { type: 'text', fontSize: Math.max(9, Math.round(size / 3.5)), dy: size / 2 - Math.max(9, Math.round(size / 3.5)) * 0.7 },
        encoding: {
          text: { field: 'arrow' },
          color: { condition: { test: 'datum.value > datum.mid', value: 'black' }, value: 'white' },
        },
      },
    ],
    transform: [
      // The colour scale and the label contrast cover the states one passes through, not terminals.
      { calculate: 'datum.terminal ? null : datum.value', as: 'inner' },
      { joinaggregate: [{ op: 'min', field: 'inner', as: 'lo' }, { op: 'max', field: 'inner', as: 'hi' }] },
      { calculate: '(datum.lo + datum.hi) / 2', as: 'mid' },
      { calculate: "datum.terminal ? datum.char : format(datum.value, '.2f')", as: 'label' },
      { calculate: "datum.portal === null ? '' : '↪' + datum.portal", as: 'portalLabel' },
    ],
    config: PLOT_CONFIG,
  };
}
