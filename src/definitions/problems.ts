/**
 * Checks that span several fields (a layout against its cells, transitions against
 * states) are written once as plain functions returning problems, so the zod schemas
 * (files and HTTP bodies) and the compilers (called directly by tests and tools) share them.
 */
import type { z } from 'zod';
import { InputError } from '../errors.js';
import { formatPath, type StandaloneParams } from './issues.js';

export type ProblemPath = readonly (string | number)[];

export interface Problem {
  /** Where in the definition; empty when the message says where itself. */
  readonly path: ProblemPath;
  readonly message: string;
}

export function problem(path: ProblemPath, message: string): Problem {
  return { path, message };
}

/** `states["1,1"]: "jump" is not an action`, or just the message for the root. */
export function formatProblem(p: Problem): string {
  const where = formatPath(p.path);
  return where ? `${where}: ${p.message}` : p.message;
}

/** Adds problems to a zod refinement as custom issues that print exactly as {@link formatProblem}. */
export function reportProblems(problems: readonly Problem[], ctx: z.RefinementCtx): void {
  for (const p of problems) {
    const params: StandaloneParams = { standalone: true };
    ctx.addIssue({ code: 'custom', path: [...p.path], message: formatProblem(p), params });
  }
}

/** Throws the first problem as an InputError labelled with the file. */
export function throwIfProblems(problems: readonly Problem[], label: string): void {
  if (problems.length > 0) throw new InputError(label, formatProblem(problems[0]));
}
