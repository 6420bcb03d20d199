/**
 * `"kind": "arrows"`: a policy drawn over a gridworld's layout, one symbol per cell.
 * Built-in symbols are ^ v < > (the four moves) and * (uniform); `key` adds or overrides
 * symbols. Wall and terminal cells are never acted in, so their symbols are ignored.
 */
import { InputError } from '../errors.js';
import { resolveChoice } from './action-choice.js';
import type { BuiltPolicy, DefinitionSource } from './built.js';
import type { FiniteMdp } from './finite-mdp.js';
import { matrixFromRows, uniformRow } from './policy-matrix.js';
import { type ActionChoice, type ArrowsPolicyDefinition } from './policy-schema.js';
import { characters } from './schema-parts.js';

export const BUILT_IN_ARROWS: Readonly<Record<string, ActionChoice>> = {
  '^': 'up',
  v: 'down',
  '<': 'left',
  '>': 'right',
  '*': 'uniform',
};

export function buildArrowsPolicy(def: ArrowsPolicyDefinition, mdp: FiniteMdp, source: DefinitionSource): BuiltPolicy {
  const grid = mdp.grid;
  const fail = (detail: string) => new InputError(source.label, detail);
  if (!grid) throw fail('an "arrows" policy needs a gridworld environment (it is drawn over the layout)');
  if (def.rows.length !== grid.rows) throw fail(`rows has ${def.rows.length} rows, the layout has ${grid.rows}`);
  const picture = def.rows.map(characters);
  picture.forEach((row, r) => {
    if (row.length !== grid.cols) throw fail(`rows[${r}] has ${row.length} characters, the layout has ${grid.cols} columns`);
  });

  const context = { actions: mdp.actionNames, label: source.label };
  const resolved = new Map<string, Float64Array>();
  const rowFor = (symbol: string, r: number, c: number): Float64Array => {
    let row = resolved.get(symbol);
    if (row) return row;
    if (symbol in def.key) row = resolveChoice(def.key[symbol], ['key', symbol], context, true);
    else if (symbol in BUILT_IN_ARROWS) row = resolveChoice(BUILT_IN_ARROWS[symbol], [], context, true);
    else throw fail(`rows[${r}], column ${c}: '${symbol}' is not an arrow (use ^ v < > * or add it to "key")`);
    resolved.set(symbol, row);
    return row;
  };

  const stateRows: Float64Array[] = new Array(mdp.stateCount);
  picture.forEach((row, r) =>
    row.forEach((symbol, c) => {
      const s = grid.cellState[r * grid.cols + c];
      if (s < 0 || mdp.terminal[s]) return;
      stateRows[s] = rowFor(symbol, r, c);
    }),
  );
  const matrix = matrixFromRows(mdp.stateCount, mdp.actionCount, (s) => stateRows[s] ?? uniformRow(mdp.actionCount));
  return { kind: 'matrix', matrix };
}
