/**
 * `"kind": "table"`: an action or distribution per named state, with an optional default.
 * On a finite environment every non-terminal state must be covered when there is no
 * default (checked now, so a typo cannot silently fall back); on a code environment states
 * are only known at run time, so a missing one fails then.
 */
import { InputError } from '../errors.js';
import type { BuiltPolicy, DefinitionSource } from './built.js';
import { resolveChoice, type ChoiceContext } from './action-choice.js';
import { listNames } from './describe-value.js';
import type { FiniteMdp } from './finite-mdp.js';
import { cumulativeRow, matrixFromRows, sampleCumulative, uniformRow } from './policy-matrix.js';
import type { TablePolicyDefinition } from './policy-schema.js';
import { formatProblem, problem } from './problems.js';
import { didYouMean } from './suggest.js';
import type { Environment } from '../plugin.js';

interface ResolvedTable {
  readonly rows: Map<string, Float64Array>;
  readonly fallback: Float64Array | null;
}

function resolveTable(def: TablePolicyDefinition, context: ChoiceContext): ResolvedTable {
  const rows = new Map<string, Float64Array>();
  for (const [state, choice] of Object.entries(def.states)) {
    rows.set(state, resolveChoice(choice, ['states', state], context, false));
  }
  const fallback = def.default === undefined ? null : resolveChoice(def.default, ['default'], context, true);
  return { rows, fallback };
}

export function buildTablePolicyFinite(def: TablePolicyDefinition, mdp: FiniteMdp, source: DefinitionSource): BuiltPolicy {
  const context = { actions: mdp.actionNames, label: source.label };
  const { rows, fallback } = resolveTable(def, context);
  for (const state of rows.keys()) {
    if (!mdp.stateIndex.has(state)) {
      const detail = `not a state of this environment${didYouMean(state, mdp.stateNames)}`;
      throw new InputError(source.label, formatProblem(problem(['states', state], detail)));
    }
  }
  if (fallback === null) {
    const missing = mdp.stateNames.filter((name, s) => !mdp.terminal[s] && !rows.has(name));
    if (missing.length > 0) {
      throw new InputError(
        source.label,
        `no action for state${missing.length === 1 ? '' : 's'} ${listNames(missing)}; list ${missing.length === 1 ? 'it' : 'them'} in "states" or add a "default"`,
      );
    }
  }
  const matrix = matrixFromRows(mdp.stateCount, mdp.actionCount, (s) => {
    const row = rows.get(mdp.stateNames[s]);
    if (row) return row;
    return fallback ?? uniformRow(mdp.actionCount); // the uniform row only for terminal states, never acted in
  });
  return { kind: 'matrix', matrix };
}

export function buildTablePolicyCode(
  def: TablePolicyDefinition,
  env: Environment,
  actions: readonly string[],
  source: DefinitionSource,
): BuiltPolicy {
  const { rows, fallback } = resolveTable(def, { actions, label: source.label });
  const toSampler = (row: Float64Array) => {
    const only = row.filter((p) => p > 0).length === 1 ? row.findIndex((p) => p > 0) : -1;
    return { cumulative: cumulativeRow(row), only };
  };
  const samplers = new Map([...rows].map(([name, row]) => [name, toSampler(row)] as const));
  const fallbackSampler = fallback ? toSampler(fallback) : null;
  const nameOf = (state: unknown) => (env.stateName ? env.stateName(state) : String(state));
  return {
    kind: 'code',
    matrix: null,
    probabilitiesAt(state) {
      const row = rows.get(nameOf(state)) ?? fallback;
      if (!row) throw new InputError(source.label, `no action for state "${nameOf(state)}" and no "default"`);
      return row;
    },
    acting: {
      act(state, rng) {
        const name = env.stateName ? env.stateName(state) : String(state);
        const sampler = samplers.get(name) ?? fallbackSampler;
        if (!sampler) {
          throw new InputError(source.label, `no action for state "${name}" and no "default"`);
        }
        return sampler.only >= 0 ? sampler.only : sampleCumulative(sampler.cumulative, rng.uniform());
      },
    },
  };
}
