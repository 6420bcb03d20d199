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
 *       const right = rng.bernoulli(action === 1 ? pRight + 0.1 : pRight);
 *       out.state = right ? state + 1 : state - 1;
 *       out.reward = out.state === 4 ? 1 : 0;
 *       out.done = out.state === 0 || out.state === 4;
 *       return out; // filling `out` avoids an allocation per step
 *     },
 *   };
 * }
 */

/**
 * Uniform random numbers from one seeded stream: what every generator in reckon provides.
 * Its methods use `this`: hand a sampler `() => rng.uniform()`, not `rng.uniform` itself.
 */
export interface UniformSource {
  /** A uniform double in [0, 1). */
  uniform(): number;
  /** A uniform integer in [0, n). */
  integer(n: number): number;
  /** A raw uniform 32-bit unsigned integer. */
  uint32(): number;
}

/**
 * Random numbers for one episode and one stream (the environment's, or the policy's). The
 * same object is re-seeded in place for every episode, so a sampler built once on it stays
 * valid across episodes.
 *
 * **Reproducibility.** These methods, and only these, keep a module reproducible (the same
 * seed gives the same returns, bit for bit, whatever `--workers`, shards or resumes) and on
 * common random numbers (two policies face the same environment noise). `Math.random`, a
 * sampler with a seed of its own, or any state carried from one episode to the next breaks
 * both, silently.
 *
 * The named distributions draw only from this stream, allocate nothing, and throw on an
 * invalid parameter (the run then fails naming the episode, the step and the value). They
 * are @stdlib's samplers fed by this stream.
 *
 * @example
 * const demand = rng.poisson(4);              // customers today
 * const delay = rng.exponential(1 / 12);      // minutes, mean 12
 * const mix = rng.dirichlet([2, 1, 1], out);  // shares, written into `out`
 */
export interface Rng extends UniformSource {
  /** Normal with mean `mu` and standard deviation `sigma` > 0. */
  normal(mu: number, sigma: number): number;
  /** Poisson with mean `lambda` > 0: 0, 1, 2, ... */
  poisson(lambda: number): number;
  /** Exponential with rate `rate` > 0 (mean 1/rate). */
  exponential(rate: number): number;
  /** Gamma with `shape` > 0 and `scale` > 0 (mean shape·scale). */
  gamma(shape: number, scale: number): number;
  /** Beta with shapes `a` > 0 and `b` > 0, in (0, 1). */
  beta(a: number, b: number): number;
  /** Binomial: successes in `n` (an integer >= 0) trials of probability `p` in [0, 1]. */
  binomial(n: number, p: number): number;
  /** Geometric: failures before the first success, success probability `p` in (0, 1]. */
  geometric(p: number): number;
  /** An index in [0, weights.length) drawn with probability weights[i] / sum (weights >= 0, sum > 0). */
  categorical(weights: ArrayLike<number>): number;
  /**
   * Dirichlet with concentrations `alphas` (each > 0), written into `out` (at least as long)
   * and returned: fresh shares that sum to 1, with no allocation.
   */
  dirichlet<T extends { [i: number]: number; readonly length: number }>(alphas: ArrayLike<number>, out: T): T;
  /** True with probability `p` in [0, 1]. */
  bernoulli(p: number): boolean;
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
