import type { GridShape } from '../definitions/finite-mdp.js';
import { columns } from './format.js';

/**
 * Draws one number per cell in the layout's shape: walls as '#', and `mark(state)` may
 * replace a value (terminals are shown as their layout character with the value beside).
 */
export function gridMap(grid: GridShape, cell: (state: number, char: string) => string): string[] {
  const rows: string[][] = [];
  for (let r = 0; r < grid.rows; r++) {
    const row: string[] = [];
    for (let c = 0; c < grid.cols; c++) {
      const i = r * grid.cols + c;
      const state = grid.cellState[i];
      row.push(state < 0 ? '#' : cell(state, grid.cellChar[i]));
    }
    rows.push(row);
  }
  const width = Math.max(...rows.flat().map((s) => s.length));
  return columns(rows.map((row) => row.map((s) => s.padStart(width))), '    ');
}
