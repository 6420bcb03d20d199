import { Matrix, solve } from 'ml-matrix';
import type { PolicyMatrix } from '../../src/definitions/finite-mdp.js';
import { type MdpSpec, type TransitionSpec, policyFromTable, seededUniform } from './build-mdp.js';

export interface RandomCase {
  spec: MdpSpec;
  table: number[][];
  policy: PolicyMatrix;
}

/**
 * A seeded random tabular MDP: 2–60 states, 2–4 actions, 1–3 successors per pair, rewards in
 * [−1, 1], about one state in seven terminal, a random policy with some zero entries. With
 * `everyStateCanEnd`, each non-terminal pair also reaches a terminal with positive
 * probability, so every policy ends episodes with probability 1 (needed for γ = 1).
 */
export function randomCase(seed: number, discount: number, everyStateCanEnd = false): RandomCase {
  const u = seededUniform(seed);
  const pick = (lo: number, hi: number) => lo + Math.floor(u() * (hi - lo + 1));
  const stateCount = pick(2, 60);
  const actionCount = pick(2, 4);
  const terminal: number[] = [];
  for (let s = 1; s < stateCount; s++) if (u() < 1 / 7) terminal.push(s);
  if (everyStateCanEnd && terminal.length === 0) terminal.push(stateCount - 1);
  const transitions: TransitionSpec[] = [];
  for (let s = 0; s < stateCount; s++) {
    if (terminal.includes(s)) continue;
    for (let a = 0; a < actionCount; a++) {
      const successors = pick(1, 3);
      const targets = Array.from({ length: successors }, () => pick(0, stateCount - 1));
      if (everyStateCanEnd) targets.push(terminal[pick(0, terminal.length - 1)]);
      const weights = targets.map(() => 0.05 + u());
      const total = weights.reduce((x, y) => x + y, 0);
      targets.forEach((to, k) => transitions.push({ from: s, action: a, to, p: weights[k] / total, reward: 2 * u() - 1 }));
    }
  }
  const table = Array.from({ length: stateCount }, () => {
    const row = Array.from({ length: actionCount }, () => (u() < 0.25 ? 0 : u()));
    if (row.every((x) => x === 0)) row[pick(0, actionCount - 1)] = 1;
    const total = row.reduce((x, y) => x + y, 0);
    return row.map((x) => x / total);
  });
  const spec: MdpSpec = {
    stateCount,
    actionCount,
    transitions,
    start: [[0, 1]],
    terminal,
    discount,
    horizon: 1,
  };
  return { spec, table, policy: policyFromTable(table) };
}

/**
 * The reference answer: P_π and r_π assembled from the raw transition list (not from the code
 * under test) and (I − γP_π)V = r_π over non-terminal states solved by ml-matrix's LU solve.
 */
export function referenceValues(c: RandomCase): Float64Array {
  const { spec, table } = c;
  const live = Array.from({ length: spec.stateCount }, (_, s) => s).filter((s) => !(spec.terminal ?? []).includes(s));
  const row = new Map(live.map((s, i) => [s, i]));
  const a = Matrix.eye(live.length, live.length);
  const b = Matrix.zeros(live.length, 1);
  for (const t of spec.transitions) {
    const i = row.get(t.from);
    if (i === undefined) continue;
    const w = table[t.from][t.action] * t.p;
    b.set(i, 0, b.get(i, 0) + w * t.reward);
    const j = row.get(t.to);
    if (j !== undefined) a.set(i, j, a.get(i, j) - spec.discount * w);
  }
  const x = solve(a, b);
  const values = new Float64Array(spec.stateCount);
  live.forEach((s, i) => (values[s] = x.get(i, 0)));
  return values;
}
