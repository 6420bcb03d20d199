/**
 * `"kind": "module"` policies: the user's PolicyFactory (src/plugin.ts). `act` may return
 * an action index or name; on a finite environment `probabilities(state)`, when present,
 * is tabulated into a matrix so exact evaluation can use it. On a finite environment the
 * module sees state names ("row,col" or the tabular names), never internal indices.
 */
import { InputError } from '../errors.js';
import type { Policy, PolicyFactory } from '../plugin.js';
import type { ActingPolicy, BuiltEnvironment, BuiltPolicy, DefinitionSource } from './built.js';
import { describeValue, formatNumber } from './describe-value.js';
import { describeIssues } from './issues.js';
import { importFactory } from './module-loader.js';
import { pluginPolicySchema, type ModulePolicyDefinition } from './module-schema.js';
import { matrixFromRows, uniformRow } from './policy-matrix.js';
import { SUM_TOLERANCE } from './schema-parts.js';
import type { FiniteMdp, PolicyMatrix } from './finite-mdp.js';

export function environmentActions(env: BuiltEnvironment): readonly string[] {
  return env.kind === 'finite' ? env.mdp.actionNames : env.actionNames;
}

/** Converts what `act` returned into an action index, or throws (the engine wraps it with episode and step). */
export function actionIndexOf(result: unknown, actions: readonly string[], label: string): number {
  if (typeof result === 'number' && Number.isInteger(result) && result >= 0 && result < actions.length) return result;
  if (typeof result === 'string') {
    const a = actions.indexOf(result);
    if (a >= 0) return a;
  }
  throw new Error(`${label}: act returned ${describeValue(result)}, which is not an action (an index below ${actions.length} or one of ${actions.join(', ')})`);
}

export async function buildModulePolicy(
  def: ModulePolicyDefinition,
  env: BuiltEnvironment,
  source: DefinitionSource,
): Promise<BuiltPolicy> {
  const factory = (await importFactory(def.path, source, 'policy')) as unknown as PolicyFactory;
  const actions = environmentActions(env);
  const label = `policy from "${def.path}"`;
  let policy: Policy;
  try {
    policy = await factory(def.options, { actions: [...actions] });
  } catch (e) {
    throw new InputError(source.label, `${label} threw while being created: ${(e as Error)?.message ?? e}`, { cause: e });
  }
  const checked = pluginPolicySchema.safeParse(policy);
  if (!checked.success) {
    throw new InputError(source.label, `${label}: ${describeIssues(checked.error.issues, policy)}`, { cause: checked.error });
  }

  const where = `${source.label}: ${label}`;
  if (env.kind === 'module') {
    const index = (answer: unknown) => actionIndexOf(answer, actions, where);
    const acting: ActingPolicy = { act: (state, rng) => index(policy.act(state, rng)), direct: { policy, index } };
    if (!policy.probabilities) return { kind: 'code', acting, matrix: null };
    const describe = (state: unknown) => (env.env.stateName ? env.env.stateName(state) : String(state));
    const probabilitiesAt = (state: unknown) => probabilityRow(policy, state, actions, (detail) => new InputError(source.label, `${label}: probabilities("${describe(state)}") ${detail}`));
    return { kind: 'code', acting, matrix: null, probabilitiesAt };
  }
  const mdp = env.mdp;
  const nameOf = (state: unknown): string => (typeof state === 'number' ? mdp.stateNames[state] : String(state));
  const acting: ActingPolicy = { act: (state, rng) => actionIndexOf(policy.act(nameOf(state), rng), actions, where) };
  const matrix = policy.probabilities ? tabulate(policy, mdp, source.label, label) : null;
  return { kind: 'code', acting, matrix };
}

function tabulate(policy: Policy, mdp: FiniteMdp, fileLabel: string, label: string): PolicyMatrix {
  return matrixFromRows(mdp.stateCount, mdp.actionCount, (s) => {
    if (mdp.terminal[s]) return uniformRow(mdp.actionCount);
    const name = mdp.stateNames[s];
    return probabilityRow(policy, name, mdp.actionNames, (detail) => new InputError(fileLabel, `${label}: probabilities("${name}") ${detail}`));
  });
}

/** `probabilities(state)` as a checked row over the actions: non-negative, summing to 1. */
function probabilityRow(policy: Policy, state: unknown, actions: readonly string[], fail: (detail: string) => Error): Float64Array {
  let given: unknown;
  try {
    given = policy.probabilities!(state);
  } catch (e) {
    throw fail(`threw: ${(e as Error)?.message ?? e}`);
  }
  const row = new Float64Array(actions.length);
  if (Array.isArray(given)) {
    if (given.length !== actions.length) throw fail(`returned ${given.length} numbers for ${actions.length} actions`);
    given.forEach((p, a) => (row[a] = p as number));
  } else if (given !== null && typeof given === 'object') {
    for (const [action, p] of Object.entries(given)) {
      const a = actions.indexOf(action);
      if (a < 0) throw fail(`names "${action}", which is not an action`);
      row[a] = p as number;
    }
  } else {
    throw fail(`returned ${describeValue(given)}; expected {action: probability} or an array by action index`);
  }
  if (!row.every((p) => Number.isFinite(p) && p >= 0)) throw fail('returned a negative or non-numeric probability');
  const sum = row.reduce((a, b) => a + b, 0);
  if (Math.abs(sum - 1) > SUM_TOLERANCE) throw fail(`sums to ${formatNumber(sum)}, not 1`);
  return row;
}
