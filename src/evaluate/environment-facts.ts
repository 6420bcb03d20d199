import type { BuiltEnvironment, BuiltPolicy } from '../definitions/built.js';
import { truncationBound } from '../definitions/horizon.js';
import { expectedReturn, moduleReturnBounds, returnBounds } from '../exact/index.js';
import { terminalStates, type TerminalState } from '../definitions/terminal-states.js';

/** What a report says about the environment a run used, beside the estimate. */
export interface EnvironmentFacts {
  readonly kind: 'finite' | 'module';
  readonly discount: number;
  readonly horizon: number;
  readonly horizonDerived: boolean;
  readonly actions: readonly string[];
  readonly states: number | null;
  /** Smallest and largest reward a step can pay, when known. */
  readonly rewardRange: readonly [number, number] | null;
  /** Smallest and largest possible return under this policy (exact for finite envs), when known. */
  readonly returnBounds: [number, number] | null;
  /** γ^H·max|r|/(1−γ): how far the horizon-H value can be from the untruncated one; null when γ = 1 or unknown. */
  readonly truncationBound: number | null;
  /**
   * The terminal states of a finite environment, by index, name and cell letter: what
   * `terminal=X` events are resolved against. Absent for module environments and for runs
   * stored before it was recorded.
   */
  readonly terminals?: readonly TerminalState[];
  /**
   * The exact E[G_H] the episodes estimate, for a finite environment and a policy with known
   * probabilities; null otherwise, and absent in runs stored before it was kept.
   */
  readonly exactValue?: number | null;
}

/**
 * Largest states × actions × horizon for which a report computes the exact value beside the
 * estimate: the recursion costs about that many steps of a few edges each (a 1,000-state MDP
 * with horizon 400 took 0.12 s on a loaded 2-core machine), so larger ones would add seconds
 * to every run; `reckon exact` still evaluates them.
 */
export const EXACT_BESIDE_BUDGET = 10_000_000;

export function environmentFacts(env: BuiltEnvironment, policy: BuiltPolicy | null, startIndex = -1): EnvironmentFacts {
  if (env.kind === 'finite') {
    const mdp = env.mdp;
    const matrix = policy === null ? null : policy.matrix;
    const maxAbs = Math.max(Math.abs(mdp.rewardRange[0]), Math.abs(mdp.rewardRange[1]));
    return {
      kind: 'finite',
      discount: mdp.discount,
      horizon: mdp.horizon,
      horizonDerived: mdp.horizonDerived,
      actions: mdp.actionNames,
      states: mdp.stateCount,
      rewardRange: mdp.rewardRange,
      returnBounds: returnBounds(mdp, matrix, startIndex >= 0 ? startIndex : undefined),
      truncationBound: truncationBound(mdp.discount, mdp.horizon, maxAbs),
      terminals: terminalStates(mdp),
      exactValue: matrix && mdp.stateCount * mdp.actionCount * mdp.horizon <= EXACT_BESIDE_BUDGET ? expectedReturn(mdp, matrix, startIndex >= 0 ? startIndex : undefined) : null,
    };
  }
  const range = env.rewardRange;
  return {
    kind: 'module',
    discount: env.discount,
    horizon: env.horizon,
    horizonDerived: env.horizonDerived,
    actions: env.actionNames,
    states: null,
    rewardRange: range,
    returnBounds: range ? moduleReturnBounds(range, env.discount, env.horizon) : null,
    truncationBound: range ? truncationBound(env.discount, env.horizon, Math.max(Math.abs(range[0]), Math.abs(range[1]))) : null,
  };
}
