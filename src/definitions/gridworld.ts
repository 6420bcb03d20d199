/**
 * Compiles a gridworld to the finite-MDP form. Transition model: the intended move with
 * probability 1−q and each perpendicular move with q/2, as in the 4×3 world of Russell &
 * Norvig, AIMA 3rd ed. §17.1 (q = 0.2 there; from memory); blocked moves stay put and pay
 * the bump reward. Portals jump whatever the action, as in Sutton & Barto (2018) Example 3.5.
 */
import type { DefinitionSource } from './built.js';
import type { FiniteMdp, GridShape } from './finite-mdp.js';
import { gridworldProblems, type GridCell, type GridworldDefinition } from './gridworld-schema.js';
import { assembleFiniteMdp, normalise, type Outcome } from './outcome-table.js';
import { throwIfProblems } from './problems.js';
import { characters } from './schema-parts.js';

/** Gridworld actions, in this order (the file format's contract). */
export const GRID_ACTIONS = ['up', 'down', 'left', 'right'] as const;

const MOVES: readonly (readonly [number, number])[] = [
  [-1, 0],
  [1, 0],
  [0, -1],
  [0, 1],
];
/** The two moves at right angles to each action (by index into GRID_ACTIONS). */
const PERPENDICULAR: readonly (readonly [number, number])[] = [
  [2, 3],
  [2, 3],
  [0, 1],
  [0, 1],
];

/** "row,col", 0-based: the state name of a cell. */
export function cellName(row: number, col: number): string {
  return `${row},${col}`;
}

export function compileGridworld(def: GridworldDefinition, source: DefinitionSource): FiniteMdp {
  throwIfProblems(gridworldProblems(def), source.label);
  const picture = def.layout.map(characters);
  const rows = picture.length;
  const cols = picture[0].length;
  const cellChar = picture.flat();
  const cellOf = (i: number): GridCell => def.cells[cellChar[i]];

  const cellState = new Int32Array(rows * cols).fill(-1);
  const stateCell: number[] = [];
  const stateNames: string[] = [];
  cellChar.forEach((_, i) => {
    if (cellOf(i).wall) return;
    cellState[i] = stateCell.length;
    stateCell.push(i);
    stateNames.push(cellName(Math.floor(i / cols), i % cols));
  });
  const stateCount = stateCell.length;

  const terminal = new Uint8Array(stateCount);
  const startWeight = new Float64Array(stateCount);
  const anyStartGiven = stateCell.some((i) => cellOf(i).start !== undefined);
  stateCell.forEach((i, s) => {
    const cell = cellOf(i);
    terminal[s] = cell.terminal ? 1 : 0;
    startWeight[s] = anyStartGiven ? (cell.start ?? 0) : cell.terminal ? 0 : 1;
  });

  const portalTarget = (cell: GridCell): number => cellState[cellChar.indexOf(cell.portal!.to)];
  const arrivalReward = (s: number): number => cellOf(stateCell[s]).reward ?? 0;

  const move = (s: number, direction: number, probability: number): Outcome => {
    const i = stateCell[s];
    const r = Math.floor(i / cols) + MOVES[direction][0];
    const c = (i % cols) + MOVES[direction][1];
    const target = r >= 0 && r < rows && c >= 0 && c < cols ? cellState[r * cols + c] : -1;
    if (target < 0) return { next: s, probability, reward: def.step_reward + def.bump_reward };
    return { next: target, probability, reward: def.step_reward + arrivalReward(target) };
  };

  const outcomesOf = (s: number, a: number): Outcome[] => {
    const cell = cellOf(stateCell[s]);
    if (cell.portal) {
      const next = portalTarget(cell);
      const arrival = next === s ? 0 : arrivalReward(next);
      return [{ next, probability: 1, reward: def.step_reward + cell.portal.reward + arrival }];
    }
    const slip = cell.slip ?? 0;
    const [left, right] = PERPENDICULAR[a];
    return [move(s, a, 1 - slip), move(s, left, slip / 2), move(s, right, slip / 2)];
  };

  const portalTo = cellChar.map((ch) => def.cells[ch]?.portal?.to ?? null);
  const grid: GridShape = { rows, cols, cellState, cellChar, portalTo };
  return assembleFiniteMdp({
    stateNames,
    actionNames: GRID_ACTIONS,
    terminal,
    startProbability: normalise(startWeight),
    outcomesOf,
    discount: def.discount,
    horizon: def.horizon,
    truncationTolerance: def.truncation_tolerance,
    grid,
    where: source.label,
  });
}
