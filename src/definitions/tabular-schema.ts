/**
 * The tabular MDP file format: named states and actions and a list of transitions.
 * Cross-references and probability sums are checked in {@link tabularProblems}, shared by
 * the schema and the compiler.
 */
import { z } from 'zod';
import { formatNumber } from './describe-value.js';
import { problem, reportProblems, type Problem } from './problems.js';
import {
  describedFields,
  discountSchema,
  horizonSchema,
  probabilitySchema,
  strictObject,
  SUM_TOLERANCE,
  toleranceSchema,
  weightSchema,
} from './schema-parts.js';
import { didYouMean } from './suggest.js';

export const transitionSchema = strictObject({
  from: z.string(),
  action: z.string(),
  to: z.string(),
  p: probabilitySchema,
  reward: z.number().default(0),
});

const tabularShape = strictObject({
  kind: z.literal('tabular'),
  ...describedFields,
  discount: discountSchema,
  horizon: horizonSchema.optional(),
  truncation_tolerance: toleranceSchema.optional(),
  states: z.array(z.string().min(1)).min(1),
  actions: z.array(z.string().min(1)).min(1),
  /** Start weights; when omitted, uniform over non-terminal states. */
  start: z.record(z.string(), weightSchema).optional(),
  terminal: z.array(z.string()).default([]),
  transitions: z.array(transitionSchema),
});

export const tabularSchema = tabularShape.superRefine((def, ctx) => reportProblems(tabularProblems(def), ctx));

export type TabularDefinition = z.output<typeof tabularShape>;
export type TransitionDefinition = z.output<typeof transitionSchema>;

/** Key of a (state, action) pair in maps. */
export function pairKey(state: string, action: string): string {
  return `${state}\u0000${action}`;
}

function duplicates(names: readonly string[], field: string, problems: Problem[]): Set<string> {
  const seen = new Set<string>();
  names.forEach((name, i) => {
    if (seen.has(name)) problems.push(problem([field, i], `"${name}" is listed twice`));
    seen.add(name);
  });
  return seen;
}

/** Everything wrong with a structurally valid tabular MDP. */
export function tabularProblems(def: TabularDefinition): Problem[] {
  const problems: Problem[] = [];
  const states = duplicates(def.states, 'states', problems);
  const actions = duplicates(def.actions, 'actions', problems);
  const notA = (name: string, kind: string, known: Set<string>) => `"${name}" is not ${kind}${didYouMean(name, known)}`;

  const terminal = new Set<string>();
  def.terminal.forEach((name, i) => {
    if (!states.has(name)) problems.push(problem(['terminal', i], notA(name, 'a state', states)));
    terminal.add(name);
  });
  if (def.states.every((s) => terminal.has(s))) problems.push(problem([], 'every state is terminal; nothing can happen'));

  if (def.start !== undefined) {
    let total = 0;
    for (const [name, weight] of Object.entries(def.start)) {
      if (!states.has(name)) problems.push(problem(['start', name], notA(name, 'a state', states)));
      total += weight;
    }
    if (!(total > 0)) problems.push(problem(['start'], 'weights must have a positive total'));
  }

  const sums = new Map<string, number>();
  def.transitions.forEach((t, i) => {
    const at = ['transitions', i];
    if (!states.has(t.from)) problems.push(problem([...at, 'from'], notA(t.from, 'a state', states)));
    if (!actions.has(t.action)) problems.push(problem([...at, 'action'], notA(t.action, 'an action', actions)));
    if (!states.has(t.to)) problems.push(problem([...at, 'to'], notA(t.to, 'a state', states)));
    if (terminal.has(t.from)) {
      problems.push(problem([...at, 'from'], `"${t.from}" is terminal; terminal states have no transitions`));
    }
    const key = pairKey(t.from, t.action);
    sums.set(key, (sums.get(key) ?? 0) + t.p);
  });
  if (problems.length > 0) return problems;

  for (const s of def.states) {
    if (terminal.has(s)) continue;
    for (const a of def.actions) {
      const sum = sums.get(pairKey(s, a));
      if (sum === undefined) problems.push(problem([], `no transitions for state "${s}", action "${a}"`));
      else if (Math.abs(sum - 1) > SUM_TOLERANCE) {
        problems.push(problem([], `probabilities for state "${s}", action "${a}" sum to ${formatNumber(sum)}`));
      }
    }
  }
  if (def.discount === 1 && def.horizon === undefined) {
    problems.push(problem([], 'horizon is required when discount is 1'));
  }
  return problems;
}
