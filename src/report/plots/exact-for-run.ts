import { buildEnvironment, buildPolicy, parseEnvironment, parsePolicy, type DefinitionSource, type FiniteMdp, type PolicyMatrix } from '../../definitions/index.js';
import { exactEvaluation } from '../../exact/index.js';

export interface RunExactValues {
  readonly mdp: FiniteMdp;
  /** E[G_H] from the run's start: what its episodes estimate. */
  readonly value: number;
  /** V_H per state. */
  readonly states: Float64Array;
  /** The policy the values are of, for the value map's arrows. */
  readonly policy: PolicyMatrix;
  /** The run's fixed start state (`--start`), or null for the start distribution. */
  readonly start: number | null;
}

/** True when a definition names code anywhere (a module or process environment or policy, or a base). */
export function namesCode(json: unknown): boolean {
  if (Array.isArray(json)) return json.some(namesCode);
  if (json === null || typeof json !== 'object') return false;
  const record = json as Record<string, unknown>;
  if (record.kind === 'module' || record.kind === 'process') return true;
  return Object.values(record).some(namesCode);
}

/**
 * The exact values behind a stored finite run, for its plots; null for code environments or
 * policies (they are never imported just to draw a plot) or when evaluation is not possible.
 */
export async function exactForRun(
  env: { json: unknown; source: DefinitionSource },
  policy: { json: unknown; source: DefinitionSource },
  start: string | null,
): Promise<RunExactValues | null> {
  if (namesCode(env.json) || namesCode(policy.json)) return null;
  try {
    const builtEnv = await buildEnvironment(parseEnvironment(env.json, env.source), env.source);
    if (builtEnv.kind !== 'finite') return null;
    const builtPolicy = await buildPolicy(parsePolicy(policy.json, policy.source), builtEnv, policy.source);
    if (!builtPolicy.matrix) return null;
    const startIndex = start === null ? undefined : builtEnv.mdp.stateIndex.get(start);
    const result = exactEvaluation(builtEnv.mdp, builtPolicy.matrix, startIndex === undefined ? {} : { start: startIndex });
    return { mdp: builtEnv.mdp, value: result.value, states: result.states, policy: builtPolicy.matrix, start: startIndex ?? null };
  } catch {
    // A definition that no longer builds (e.g. a base file changed): plot without exact values.
    return null;
  }
}
