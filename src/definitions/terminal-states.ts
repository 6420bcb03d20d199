import type { FiniteMdp } from './finite-mdp.js';

/** A terminal state of a finite environment, as a user can name it in `--event 'terminal=X'`. */
export interface TerminalState {
  readonly index: number;
  /** Its state name ("row,col" for a gridworld cell). */
  readonly state: string;
  /** The layout character of a gridworld cell; null for tabular states. */
  readonly cell: string | null;
}

/** Every terminal state of a finite MDP, in index order. */
export function terminalStates(mdp: Pick<FiniteMdp, 'stateCount' | 'terminal' | 'stateNames' | 'grid'>): TerminalState[] {
  const cellOf = new Map<number, string>();
  const grid = mdp.grid;
  if (grid) grid.cellState.forEach((s, cell) => s >= 0 && cellOf.set(s, grid.cellChar[cell]));
  const out: TerminalState[] = [];
  for (let s = 0; s < mdp.stateCount; s++) {
    if (mdp.terminal[s] !== 0) out.push({ index: s, state: mdp.stateNames[s], cell: cellOf.get(s) ?? null });
  }
  return out;
}

/**
 * The indices of the terminals a name means: every cell with that layout character, or the
 * state of that name (a tabular state, or a gridworld cell written "row,col"). Empty when none.
 */
export function terminalsNamed(name: string, terminals: readonly TerminalState[]): number[] {
  return terminals.filter((t) => t.cell === name || t.state === name).map((t) => t.index);
}

/** The terminals as a short list for a message: "'P' (2 cells), 'X' (0,4)" or "done, failed". */
export function describeTerminals(terminals: readonly TerminalState[], max = 8): string {
  const byName = new Map<string, string[]>();
  for (const t of terminals) {
    const key = t.cell ?? t.state;
    byName.set(key, [...(byName.get(key) ?? []), t.state]);
  }
  const items = [...byName.entries()].map(([key, states]) => {
    const cell = terminals.find((t) => (t.cell ?? t.state) === key)!.cell;
    if (cell === null) return key;
    return `'${key}' (${states.length === 1 ? states[0] : `${states.length} cells`})`;
  });
  return items.length > max ? `${items.slice(0, max).join(', ')}, … (${items.length} in all)` : items.join(', ');
}
