import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { solveDenseInPlace } from './dense-solve.js';
import { buildPolicyChain, type PolicyChain } from './policy-chain.js';
import { properStates } from './proper-states.js';

/** Above this many unknowns the dense solve (n³/3 flops, 8n² bytes) gives way to iteration. */
export const DENSE_SOLVE_LIMIT = 2000;

/** Target absolute error of the iterative solve, scaled up for values larger than 1. */
const ITERATIVE_TOLERANCE = 1e-12;
/** Work cap of the iterative solve, in edge visits (a few seconds). */
const ITERATIVE_EDGE_BUDGET = 4e9;

export interface InfiniteValuesOptions {
  /** Largest system solved densely (default {@link DENSE_SOLVE_LIMIT}); tests lower it to reach the iterative path. */
  readonly denseLimit?: number;
}

/**
 * The untruncated value V^π(s) = E[Σ_t γ^t r_t | s] per state, 0 on terminals and NaN where
 * it does not exist.
 *
 * γ < 1: the linear system (I − γP_π)V = r_π over non-terminal states, nonsingular
 * (Puterman 1994, Thm 6.1.1, from memory; docs/methods.md §9). γ = 1: only states from which
 * the episode ends with probability 1 under π have a value; the others get NaN, and on the rest
 * (I − Q)V = r is the absorbing-chain fundamental-matrix solve (Kemeny & Snell 1960).
 *
 * Up to `denseLimit` unknowns the system is solved directly; above, by the sweep
 * V ← r_π + γP_πV (Sutton & Barto 2018, eq. 4.5) until the error is provably below 1e-12
 * (see {@link iterateToTolerance}).
 */
export function infiniteValues(mdp: FiniteMdp, policy: PolicyMatrix, options: InfiniteValuesOptions = {}): Float64Array {
  const chain = buildPolicyChain(mdp, policy);
  const gamma = mdp.discount;
  const values = new Float64Array(mdp.stateCount);

  const unknowns = gamma < 1 ? chain.liveStates : properStates(chain);
  if (gamma >= 1) {
    values.fill(NaN);
    for (let s = 0; s < mdp.stateCount; s++) if (mdp.terminal[s] !== 0) values[s] = 0;
  }
  const n = unknowns.length;
  if (n === 0) return values;

  // position[s] = index of s among the unknowns. Rows of unknowns only reach unknowns (or
  // terminals, already dropped): for γ = 1 a successor of a proper state is proper.
  const position = new Int32Array(mdp.stateCount).fill(-1);
  for (let i = 0; i < n; i++) position[unknowns[i]] = i;

  const solution =
    n <= (options.denseLimit ?? DENSE_SOLVE_LIMIT)
      ? solveDirect(chain, unknowns, position, gamma)
      : iterateToTolerance(chain, unknowns, position, gamma);
  for (let i = 0; i < n; i++) values[unknowns[i]] = solution[i];
  return values;
}

function solveDirect(chain: PolicyChain, unknowns: Int32Array, position: Int32Array, gamma: number): Float64Array {
  const n = unknowns.length;
  const a = new Float64Array(n * n);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = unknowns[i];
    a[i * n + i] += 1;
    b[i] = chain.meanReward[s];
    for (let e = chain.rowStart[s]; e < chain.rowStart[s + 1]; e++) {
      a[i * n + position[chain.edgeNext[e]]] -= gamma * chain.edgeWeight[e];
    }
  }
  return solveDenseInPlace(a, b, n);
}

/**
 * The sweep V_{k+1} = r + γQV_k over the unknowns, run in blocks of m sweeps. If ρ bounds the
 * row sums of (γQ)^m, the m-sweep map is a ρ-contraction in the max norm, so
 * ‖V_{k+m} − V‖ ≤ ρ‖V_{k+m} − V_k‖/(1 − ρ). For γ < 1, m = 1 and ρ = γ: the stopping rule of
 * Sutton & Barto 2018 (§4.1), in the form of docs/methods.md §9. For γ = 1, Q is substochastic with
 * every state proper, so Q^m 1 → 0 and m is the first power with max row sum ≤ 1/2
 * (the standard contraction argument for proper policies; common practice).
 *
 * Rounding keeps a sweep from settling below a few ulps of ‖V‖; once the change is at that
 * floor the iteration stops, since more sweeps cannot improve it.
 */
function iterateToTolerance(chain: PolicyChain, unknowns: Int32Array, position: Int32Array, gamma: number): Float64Array {
  const n = unknowns.length;
  // Re-index the rows over 0..n-1 so the sweep touches only the unknowns.
  const rowStart = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) {
    const s = unknowns[i];
    rowStart[i + 1] = rowStart[i] + chain.rowStart[s + 1] - chain.rowStart[s];
  }
  const column = new Int32Array(rowStart[n]);
  const coefficient = new Float64Array(rowStart[n]);
  const reward = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = unknowns[i];
    reward[i] = chain.meanReward[s];
    for (let e = chain.rowStart[s], f = rowStart[i]; e < chain.rowStart[s + 1]; e++, f++) {
      column[f] = position[chain.edgeNext[e]];
      coefficient[f] = gamma * chain.edgeWeight[e];
    }
  }
  const sweep = (from: Float64Array, to: Float64Array, constant: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      let v = constant[i];
      for (let f = rowStart[i]; f < rowStart[i + 1]; f++) v += coefficient[f] * from[column[f]];
      to[i] = v;
    }
  };
  const maxSweeps = Math.max(1000, Math.floor(ITERATIVE_EDGE_BUDGET / Math.max(1, column.length + n)));
  let sweepsLeft = maxSweeps;

  // Block length m and contraction factor ρ = ‖(γQ)^m 1‖∞.
  let blockLength = 1;
  let rho = gamma;
  if (gamma >= 1) {
    const zero = new Float64Array(n);
    let u = new Float64Array(n).fill(1);
    let next = new Float64Array(n);
    for (blockLength = 1; ; blockLength++) {
      if (--sweepsLeft < 0) throw notConverged(n, maxSweeps);
      sweep(u, next, zero);
      [u, next] = [next, u];
      rho = maxAbs(u);
      if (rho <= 0.5) break;
    }
  }

  let value = new Float64Array(n);
  let next = new Float64Array(n);
  const blockStart = new Float64Array(n);
  for (;;) {
    blockStart.set(value);
    for (let k = 0; k < blockLength; k++) {
      if (--sweepsLeft < 0) throw notConverged(n, maxSweeps);
      sweep(value, next, reward);
      [value, next] = [next, value];
    }
    let change = 0;
    for (let i = 0; i < n; i++) change = Math.max(change, Math.abs(value[i] - blockStart[i]));
    const scale = Math.max(1, maxAbs(value));
    const errorBound = (rho * change) / (1 - rho);
    if (errorBound < ITERATIVE_TOLERANCE * scale || change <= 64 * Number.EPSILON * scale) return value;
  }
}

function maxAbs(x: Float64Array): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i]));
  return m;
}

function notConverged(n: number, sweeps: number): Error {
  return new Error(`infinite-horizon value of ${n} states did not converge within ${sweeps} sweeps`);
}
