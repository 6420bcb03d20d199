/**
 * The gridworld file format: a picture (`layout`) whose characters are given meaning by
 * `cells`. Everything a person can get wrong across fields is checked in
 * {@link gridworldProblems}, shared by the schema and the compiler.
 */
import { z } from 'zod';
import { listNames } from './describe-value.js';
import { problem, reportProblems, type Problem } from './problems.js';
import {
  characters,
  describedFields,
  discountSchema,
  horizonSchema,
  isSingleCharacter,
  probabilitySchema,
  strictObject,
  toleranceSchema,
  weightSchema,
} from './schema-parts.js';

const portalSchema = strictObject({
  to: z.string(),
  reward: z.number().default(0),
});

export const gridCellSchema = strictObject({
  wall: z.boolean().optional(),
  start: weightSchema.optional(),
  terminal: z.boolean().optional(),
  reward: z.number().optional(),
  slip: probabilitySchema.optional(),
  portal: portalSchema.optional(),
});

const gridworldShape = strictObject({
  kind: z.literal('gridworld'),
  ...describedFields,
  discount: discountSchema,
  horizon: horizonSchema.optional(),
  truncation_tolerance: toleranceSchema.optional(),
  step_reward: z.number().default(0),
  bump_reward: z.number().default(0),
  layout: z.array(z.string().min(1)).min(1),
  cells: z.record(z.string(), gridCellSchema),
});

export const gridworldSchema = gridworldShape.superRefine((def, ctx) => reportProblems(gridworldProblems(def), ctx));

export type GridworldDefinition = z.output<typeof gridworldShape>;
export type GridCell = z.output<typeof gridCellSchema>;

/** Everything wrong with a structurally valid gridworld, in the order a person would fix it. */
export function gridworldProblems(def: GridworldDefinition): Problem[] {
  const problems: Problem[] = [];
  const rows = def.layout.map(characters);
  const width = rows[0]?.length ?? 0;
  rows.forEach((row, r) => {
    if (row.length !== width) {
      problems.push(problem([], `layout row ${r} has ${row.length} characters, row 0 has ${width}`));
    }
  });
  for (const key of Object.keys(def.cells)) {
    if (!isSingleCharacter(key)) problems.push(problem(['cells'], `key "${key}" must be a single character`));
  }
  const seen = new Set<string>();
  rows.forEach((row, r) =>
    row.forEach((ch, c) => {
      if (!(ch in def.cells) && !seen.has(ch)) {
        seen.add(ch);
        problems.push(problem([], `layout row ${r}, column ${c}: '${ch}' is not in cells`));
      }
    }),
  );
  if (problems.length > 0) return problems; // the cell checks below assume a well-formed picture

  const count = new Map<string, number>();
  for (const row of rows) for (const ch of row) count.set(ch, (count.get(ch) ?? 0) + 1);
  const used = [...count.keys()];

  for (const [ch, cell] of Object.entries(def.cells)) {
    const where = ['cells', ch];
    if (cell.wall) {
      for (const other of ['start', 'terminal', 'reward', 'slip', 'portal'] as const) {
        if (cell[other] !== undefined && cell[other] !== false) {
          problems.push(problem(where, `a wall can't also have "${other}"`));
        }
      }
    }
    if (cell.portal) {
      if (cell.terminal) problems.push(problem(where, `a terminal cell can't have a portal`));
      if (cell.slip !== undefined) {
        problems.push(problem(where, `a portal cell can't have "slip" (a portal moves the agent whatever the action)`));
      }
      const to = cell.portal.to;
      const times = count.get(to) ?? 0;
      if (times !== 1) {
        problems.push(
          problem([...where, 'portal', 'to'], `'${to}' appears ${times} times in layout; a portal target must appear exactly once`),
        );
      } else if (def.cells[to]?.wall) {
        problems.push(problem([...where, 'portal', 'to'], `'${to}' is a wall`));
      }
    }
  }

  if (used.some((ch) => def.cells[ch].start !== undefined)) {
    const total = used.reduce((sum, ch) => sum + (def.cells[ch].start ?? 0) * (count.get(ch) ?? 0), 0);
    if (!(total > 0)) problems.push(problem([], `start weights sum to 0; give at least one cell a positive "start"`));
  }
  const open = used.filter((ch) => !def.cells[ch].wall && !def.cells[ch].terminal);
  if (open.length === 0) {
    problems.push(problem(['layout'], `has no open non-terminal cell (characters used: ${listNames(used, 10)})`));
  }
  if (def.discount === 1 && def.horizon === undefined) {
    problems.push(problem([], 'horizon is required when discount is 1'));
  }
  return problems;
}
