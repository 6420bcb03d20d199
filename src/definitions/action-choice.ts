/** Resolves a policy file's action choice (a name, a distribution, or "uniform") against an environment's actions. */
import { InputError } from '../errors.js';
import { problem, formatProblem, type ProblemPath } from './problems.js';
import { UNIFORM, type ActionChoice } from './policy-schema.js';
import { uniformRow } from './policy-matrix.js';
import { didYouMean } from './suggest.js';

export interface ChoiceContext {
  readonly actions: readonly string[];
  readonly label: string;
}

function notAnAction(name: string, path: ProblemPath, context: ChoiceContext): InputError {
  const hint = didYouMean(name, context.actions) || ` (actions: ${context.actions.join(', ')})`;
  return new InputError(context.label, formatProblem(problem(path, `"${name}" is not an action of this environment${hint}`)));
}

/** A probability row over the environment's actions; throws InputError naming `path` for an unknown action. */
export function resolveChoice(
  choice: ActionChoice,
  path: ProblemPath,
  context: ChoiceContext,
  allowUniform: boolean,
): Float64Array {
  const { actions } = context;
  if (typeof choice === 'string') {
    if (allowUniform && choice === UNIFORM && !actions.includes(UNIFORM)) return uniformRow(actions.length);
    const a = actions.indexOf(choice);
    if (a < 0) throw notAnAction(choice, path, context);
    const row = new Float64Array(actions.length);
    row[a] = 1;
    return row;
  }
  const row = new Float64Array(actions.length);
  for (const [name, p] of Object.entries(choice)) {
    const a = actions.indexOf(name);
    if (a < 0) throw notAnAction(name, path, context);
    row[a] += p;
  }
  return row;
}
