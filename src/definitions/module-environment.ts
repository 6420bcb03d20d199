/**
 * Builds a `"kind": "module"` environment: calls the user's factory, checks what it
 * returns against the plug-in interface (src/plugin.ts) and resolves the horizon, derived
 * from `rewardBounds` when the module gives none (definitions/horizon.ts). The old name
 * `rewardRange` is still read, with a warning.
 */
import { InputError } from '../errors.js';
import type { Environment, EnvironmentFactory } from '../plugin.js';
import type { DefinitionSource, ModuleEnvironment } from './built.js';
import { DEFAULT_TRUNCATION_TOLERANCE, resolveHorizon } from './horizon.js';
import { describeIssues } from './issues.js';
import { importFactory } from './module-loader.js';
import { pluginEnvironmentSchema, type ModuleEnvironmentDefinition } from './module-schema.js';
import { formatNumber } from './describe-value.js';
import { warnDeprecated } from './deprecation.js';

export async function buildModuleEnvironment(
  def: ModuleEnvironmentDefinition,
  source: DefinitionSource,
): Promise<ModuleEnvironment> {
  const factory = (await importFactory(def.path, source, 'environment')) as unknown as EnvironmentFactory;
  const label = `environment from "${def.path}"`;
  let env: Environment;
  try {
    env = await factory(def.options);
  } catch (e) {
    throw new InputError(source.label, `${label} threw while being created: ${(e as Error)?.message ?? e}`, { cause: e });
  }
  return checkedCodeEnvironment(env, def.truncation_tolerance, label, source);
}

/**
 * What a code environment declared, checked against the plug-in interface, with its horizon
 * resolved: shared by module environments and process environments (process-environment.ts).
 */
export function checkedCodeEnvironment(
  env: Environment,
  truncationTolerance: number | undefined,
  label: string,
  source: DefinitionSource,
): ModuleEnvironment {
  const checked = pluginEnvironmentSchema.safeParse(env);
  if (!checked.success) {
    throw new InputError(source.label, `${label}: ${describeIssues(checked.error.issues, env)}`, { cause: checked.error });
  }
  if (env.discount >= 1 && env.horizon === undefined) {
    throw new InputError(source.label, `${label} has discount 1 but no "horizon"; a horizon is required when discount is 1`);
  }
  const declared = declaredRewardBounds(env, label, source.label);
  const rewardRange = declared ? ([declared[0], declared[1]] as const) : null;
  if (env.horizon === undefined && env.discount < 1 && rewardRange === null) {
    throw new InputError(
      source.label,
      `${label} has discount ${formatNumber(env.discount)} but neither "horizon" nor "rewardBounds"; give one so episodes can be cut`,
    );
  }
  const maxAbsReward = rewardRange ? Math.max(Math.abs(rewardRange[0]), Math.abs(rewardRange[1])) : 0;
  const { horizon, horizonDerived } = resolveHorizon(
    env.discount,
    env.horizon,
    maxAbsReward,
    truncationTolerance ?? DEFAULT_TRUNCATION_TOLERANCE,
    source.label,
  );
  return {
    kind: 'module',
    env,
    actionNames: [...env.actions],
    discount: env.discount,
    horizon,
    horizonDerived,
    rewardRange,
  };
}

/**
 * The per-step reward bounds a module declares: `rewardBounds`, or the deprecated
 * `rewardRange` that modules written before the rename still use.
 */
function declaredRewardBounds(env: Environment, label: string, where: string): readonly [number, number] | undefined {
  if (env.rewardRange === undefined) return env.rewardBounds;
  if (env.rewardBounds !== undefined) {
    throw new InputError(where, `${label} gives both "rewardBounds" and its old name "rewardRange"; keep "rewardBounds" only`);
  }
  warnDeprecated(where, `${label}: "rewardRange" is deprecated; rename it "rewardBounds" (same meaning)`);
  return env.rewardRange;
}
