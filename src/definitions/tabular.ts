/** Compiles a tabular MDP definition to the finite-MDP form (states and actions in file order). */
import type { DefinitionSource } from './built.js';
import type { FiniteMdp } from './finite-mdp.js';
import { assembleFiniteMdp, normalise, type Outcome } from './outcome-table.js';
import { throwIfProblems } from './problems.js';
import { tabularProblems, type TabularDefinition } from './tabular-schema.js';

export function compileTabular(def: TabularDefinition, source: DefinitionSource): FiniteMdp {
  throwIfProblems(tabularProblems(def), source.label);
  const stateIndex = new Map(def.states.map((name, i) => [name, i] as const));
  const actionIndex = new Map(def.actions.map((name, i) => [name, i] as const));
  const stateCount = def.states.length;
  const actionCount = def.actions.length;

  const terminal = new Uint8Array(stateCount);
  for (const name of def.terminal) terminal[stateIndex.get(name)!] = 1;

  const startWeight = new Float64Array(stateCount);
  if (def.start) {
    for (const [name, weight] of Object.entries(def.start)) startWeight[stateIndex.get(name)!] += weight;
  } else {
    for (let s = 0; s < stateCount; s++) startWeight[s] = terminal[s] ? 0 : 1;
  }

  const outcomes: Outcome[][] = Array.from({ length: stateCount * actionCount }, () => []);
  for (const t of def.transitions) {
    const sa = stateIndex.get(t.from)! * actionCount + actionIndex.get(t.action)!;
    outcomes[sa].push({ next: stateIndex.get(t.to)!, probability: t.p, reward: t.reward });
  }

  return assembleFiniteMdp({
    stateNames: def.states,
    actionNames: def.actions,
    terminal,
    startProbability: normalise(startWeight),
    outcomesOf: (s, a) => outcomes[s * actionCount + a],
    discount: def.discount,
    horizon: def.horizon,
    truncationTolerance: def.truncation_tolerance,
    where: source.label,
  });
}
