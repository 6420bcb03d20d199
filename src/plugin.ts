/**
 * The plug-in interface: what a `"kind": "module"` environment or policy file exports.
 * This is the one file a user implements against; it has no runtime code.
 *
 * An environment module's default export is a function `(options) => Environment`
 * (it may be async). `options` is the `"options"` object of the definition file.
 *
 * @example
 * // coin-walk.js: walk on 0..4, start at 2, +1 for reaching 4, episode ends at 0 or 4.
 * export default function create(options) {
 *   const pRight = options.pRight ?? 0.5;
 *   return {
 *     actions: ['stay', 'push'],
 *     discount: 0.95,
 *     horizon: 200,
 *     rewardBounds: [0, 1],
 *     reset: () => 2,
 *     step(state, action, rng, out) {
 *       const right = rng.uniform() < (action === 1 ? pRight + 0.1 : pRight);
 *       out.state = right ? state + 1 : state - 1;
 *       out.reward = out.state === 4 ? 1 : 0;
 *       out.done = out.state === 0 || out.state === 4;
 *       return out; // filling `out` avoids an allocation per step
 *     },
 *   };
 * }
 */

/**
 * Random numbers for one episode and one stream. The same object is re-seeded in place for
 * every episode, so a sampler built once on it stays valid across episodes. Its methods use
 * `this`: hand a sampler `() => rng.uniform()`, not `rng.uniform` itself.
 */
export interface Rng {
  /** A uniform double in [0, 1). */
  uniform(): number;
  /** A uniform integer in [0, n). */
  integer(n: number): number;
  /** A raw uniform 32-bit unsigned integer. */
  uint32(): number;
}

/** What `step` reports. */
export interface StepResult<S = unknown> {
  state: S;
  reward: number;
  done: boolean;
}

export interface Environment<S = unknown> {
  /** Action names; actions are passed to `step` as indices into this list. */
  readonly actions: readonly string[];
  /** Discount in (0, 1]. */
  readonly discount: number;
  /** Maximum steps an episode; required when discount is 1. */
  readonly horizon?: number;
  /**
   * Smallest and largest reward a step can pay. Gives the return bounds that Hoeffding,
   * empirical-Bernstein and the bounded confidence sequences need, and a horizon when none is given.
   */
  readonly rewardBounds?: readonly [number, number];
  /** @deprecated The old name of {@link Environment.rewardBounds}; still read, with a warning. */
  readonly rewardRange?: readonly [number, number];
  /** A start state. Use only `rng` for randomness so that runs are reproducible. */
  reset(rng: Rng): S;
  /**
   * One step. Fill `out` and return it (no allocation), or return a new object.
   * `action` is an index into `actions`.
   */
  step(state: S, action: number, rng: Rng, out: StepResult<S>): StepResult<S>;
  /** A stable name for a state, used by table policies and `--start`; default `String(state)`. */
  stateName?(state: S): string;
  /** The state called `name`, for `--start`. */
  stateFromName?(name: string): S;
}

/** A module policy's default export is `(options, context) => Policy` (it may be async). */
export interface PolicyContext {
  /** The environment's action names. */
  readonly actions: readonly string[];
}

export interface Policy<S = unknown> {
  /** Choose an action: an index into the environment's actions, or its name. */
  act(state: S, rng: Rng): number | string;
  /** Optional: the action distribution in `state`, as `{action: probability}` or an array by index. */
  probabilities?(state: S): Readonly<Record<string, number>> | readonly number[];
}

export type EnvironmentFactory = (options: Record<string, unknown>) => Environment | Promise<Environment>;
export type PolicyFactory = (
  options: Record<string, unknown>,
  context: PolicyContext,
) => Policy | Promise<Policy>;
