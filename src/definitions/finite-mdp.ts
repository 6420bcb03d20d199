/**
 * The one compiled form of every finite environment (gridworlds and tabular MDPs).
 * Flat typed arrays so that the rollout loop and the exact evaluator allocate nothing
 * and read memory in order.
 *
 * Outcomes of a (state, action) pair `sa = s * actionCount + a` live in the half-open
 * range `outcomeStart[sa] .. outcomeStart[sa + 1]` of the outcome arrays. Outcomes with
 * the same next state and reward are merged; probabilities are positive.
 */
export interface FiniteMdp {
  readonly stateNames: readonly string[];
  readonly actionNames: readonly string[];
  readonly stateCount: number;
  readonly actionCount: number;
  /** 1 where arriving ends the episode. */
  readonly terminal: Uint8Array;
  /** Start distribution over states (sums to 1; zero on terminals unless the file says so). */
  readonly startProbability: Float64Array;
  /** Length stateCount * actionCount + 1. */
  readonly outcomeStart: Int32Array;
  readonly outcomeNext: Int32Array;
  readonly outcomeProbability: Float64Array;
  /** Running sum of outcomeProbability within each (state, action); the last of each is exactly 1. */
  readonly outcomeCumulative: Float64Array;
  readonly outcomeReward: Float64Array;
  readonly discount: number;
  /** Maximum number of steps (rewards) in an episode; always resolved (see definitions/horizon.ts). */
  readonly horizon: number;
  /** True when the horizon was derived from the truncation tolerance rather than given. */
  readonly horizonDerived: boolean;
  /** Smallest and largest reward of any outcome. */
  readonly rewardRange: readonly [number, number];
  /** For gridworlds: the layout, so reports can draw values as a map. */
  readonly grid?: GridShape;
  /** State name -> index. */
  readonly stateIndex: ReadonlyMap<string, number>;
}

export interface GridShape {
  readonly rows: number;
  readonly cols: number;
  /** State index of each cell (row-major), -1 for walls. */
  readonly cellState: Int32Array;
  /** The layout character of each cell, row-major. */
  readonly cellChar: readonly string[];
  /** For each portal cell, the layout character it jumps to (null elsewhere); absent: no portals. */
  readonly portalTo?: readonly (string | null)[];
}

/**
 * A stationary stochastic policy over a finite MDP: `probability[s * actionCount + a]`.
 * `cumulative` is the running sum per state (last entry of each state is exactly 1), and
 * `deterministicAction[s]` is the action index when one action has probability 1, else -1,
 * so deterministic states cost no random draw.
 */
export interface PolicyMatrix {
  readonly actionCount: number;
  readonly probability: Float64Array;
  readonly cumulative: Float64Array;
  readonly deterministicAction: Int32Array;
}
