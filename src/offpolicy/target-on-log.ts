/**
 * A target policy's probabilities at the states of a log, matched by name. With a finite
 * environment the policy is built on it; without one, on a stand-in environment whose states
 * are the log's (and any state a table policy names) and whose actions are the log's, so
 * every built-in kind and a module policy with `probabilities` can be used. Rows follow the
 * log's state indices; columns are the log's actions, then any further environment action.
 */
import { dirname, isAbsolute, join, resolve } from 'node:path';
import { buildPolicy } from '../definitions/build-policy.js';
import type { DefinitionSource, FiniteEnvironment } from '../definitions/built.js';
import { listNames } from '../definitions/describe-value.js';
import type { EpisodeLog } from '../definitions/episode-log.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { parsePolicy } from '../definitions/parse.js';
import { isPolicyReference, type PolicyDefinition } from '../definitions/policy-schema.js';
import { readDefinitionFile } from '../definitions/read-file.js';
import { InputError } from '../errors.js';

export interface TargetOnLog {
  /** The log's actions, then environment actions the log never names. */
  readonly actionNames: readonly string[];
  /** π(a | s) for the log's state s and action column a: `probability[s * actionNames.length + a]`. */
  readonly probability: Float64Array;
  /** The target on the environment's own states, when one was given. */
  readonly environmentMatrix: PolicyMatrix | null;
}

/** The policy file's target probabilities at every logged state; refusals name the log line. */
export async function targetOnLog(log: EpisodeLog, path: string, env: FiniteEnvironment | null, envLabel: string | null, policyLabel: string = path): Promise<TargetOnLog> {
  const { json, source } = readDefinitionFile(path, policyLabel);
  const policyPath = policyLabel;
  const definition = parsePolicy(json, source);
  checkKnownStates(log, definition, source, policyPath);
  const mdp = env ? env.mdp : standInMdp(log, namedStates(definition, source));
  const envActions = mdp.actionNames;
  const actionNames = [...log.actionNames, ...envActions.filter((a) => !log.actionNames.includes(a))];
  const column = actionNames.map((a) => envActions.indexOf(a));
  if (env) {
    const unknown = log.actionNames.findIndex((a) => !envActions.includes(a));
    if (unknown >= 0) {
      const k = log.action.indexOf(unknown);
      const where = k >= 0 ? `${log.label}: line ${log.line[k]}` : `${log.label}: header`;
      throw new InputError(where, `action ${JSON.stringify(log.actionNames[unknown])} is not an action of ${envLabel} (its actions: ${listNames(envActions, 8)})`);
    }
  }
  const built = await buildPolicy(definition, { kind: 'finite', mdp }, source);
  const matrix = built.matrix;
  if (!matrix) {
    throw new InputError(policyPath, 'is a code policy without probabilities(state); off-policy estimates need the target\'s probabilities: add probabilities(state)');
  }
  const width = actionNames.length;
  const probability = new Float64Array(log.stateNames.length * width);
  for (let s = 0; s < log.stateNames.length; s++) {
    const m = mdp.stateIndex.get(log.stateNames[s]);
    if (m === undefined) {
      throw new InputError(`${log.label}: line ${log.stateLine[s]}`, `state ${JSON.stringify(log.stateNames[s])} is not a state of ${envLabel} (states look like ${listNames(mdp.stateNames.slice(0, 4))})`);
    }
    for (let a = 0; a < width; a++) probability[s * width + a] = matrix.probability[m * matrix.actionCount + column[a]];
  }
  if (env) checkNoStepInTerminal(log, mdp, envLabel!);
  return { actionNames, probability, environmentMatrix: env ? matrix : null };
}

/** A table policy without a default knows only the states it lists: refuse a logged state it does not know. */
function checkKnownStates(log: EpisodeLog, definition: PolicyDefinition, source: DefinitionSource, policyPath: string): void {
  const known = knownStates(definition, source);
  if (known === 'all') return;
  const actedIn = new Uint8Array(log.stateNames.length);
  for (const s of log.state) actedIn[s] = 1;
  for (let s = 0; s < log.stateNames.length; s++) {
    if (!known.has(log.stateNames[s]) && actedIn[s]) {
      throw new InputError(
        `${log.label}: line ${log.stateLine[s]}`,
        `state ${JSON.stringify(log.stateNames[s])} is not known to the target policy ${policyPath} (a table without "default" that lists ${listNames([...known])}): list the state or add a "default"`,
      );
    }
  }
}

function knownStates(definition: PolicyDefinition, source: DefinitionSource): Set<string> | 'all' {
  if (definition.kind === 'table') return definition.default === undefined ? new Set(Object.keys(definition.states)) : 'all';
  if (definition.kind === 'epsilon') {
    const base = resolveBase(definition.base, source);
    return base ? knownStates(base.definition, base.source) : 'all';
  }
  return 'all';
}

/** The state names a table policy (or an epsilon policy's base) lists, so a stand-in environment has them all. */
function namedStates(definition: PolicyDefinition, source: DefinitionSource): string[] {
  if (definition.kind === 'table') return Object.keys(definition.states);
  if (definition.kind === 'epsilon') {
    const base = resolveBase(definition.base, source);
    return base ? namedStates(base.definition, base.source) : [];
  }
  return [];
}

function resolveBase(base: PolicyDefinition | { path: string }, source: DefinitionSource): { definition: PolicyDefinition; source: DefinitionSource } | null {
  if (!isPolicyReference(base)) return { definition: base as PolicyDefinition, source };
  const label = isAbsolute(base.path) ? base.path : join(dirname(source.label), base.path);
  try {
    const file = readDefinitionFile(resolve(source.baseDir, base.path), label);
    return { definition: parsePolicy(file.json, file.source), source: file.source };
  } catch {
    return null; // building the policy reports the file's problem
  }
}

function checkNoStepInTerminal(log: EpisodeLog, mdp: FiniteMdp, envLabel: string): void {
  for (let k = 0; k < log.state.length; k++) {
    const m = mdp.stateIndex.get(log.stateNames[log.state[k]])!;
    if (mdp.terminal[m]) {
      throw new InputError(`${log.label}: line ${log.line[k]}`, `state ${JSON.stringify(log.stateNames[log.state[k]])} is terminal in ${envLabel}: no action is taken there, so no step can be logged in it`);
    }
  }
}

/** A finite MDP with the log's states and actions and nothing else: enough to build a policy's matrix. */
function standInMdp(log: EpisodeLog, extraStates: readonly string[]): FiniteMdp {
  const stateNames = [...log.stateNames, ...extraStates.filter((s) => !log.stateNames.includes(s))];
  const stateCount = stateNames.length;
  const actionCount = log.actionNames.length;
  const pairs = stateCount * actionCount;
  const outcomeStart = new Int32Array(pairs + 1);
  const outcomeNext = new Int32Array(pairs);
  for (let sa = 0; sa < pairs; sa++) {
    outcomeStart[sa + 1] = sa + 1;
    outcomeNext[sa] = Math.floor(sa / actionCount);
  }
  const startProbability = new Float64Array(stateCount).fill(1 / stateCount);
  return {
    stateNames,
    actionNames: log.actionNames,
    stateCount,
    actionCount,
    terminal: new Uint8Array(stateCount),
    startProbability,
    outcomeStart,
    outcomeNext,
    outcomeProbability: new Float64Array(pairs).fill(1),
    outcomeCumulative: new Float64Array(pairs).fill(1),
    outcomeReward: new Float64Array(pairs),
    discount: log.header?.discount ?? 1,
    horizon: log.header?.horizon ?? 1,
    horizonDerived: false,
    rewardRange: [0, 0],
    stateIndex: new Map(stateNames.map((n, i) => [n, i])),
  };
}
