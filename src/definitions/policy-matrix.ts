/** Building {@link PolicyMatrix} tables and sampling from their rows. */
import type { PolicyMatrix } from './finite-mdp.js';

/** Every action equally likely. */
export function uniformRow(actionCount: number): Float64Array {
  return new Float64Array(actionCount).fill(1 / actionCount);
}

/**
 * A matrix from one probability row per state. Rows are normalised (files may be off by
 * 1e-9), the cumulative row ends in exactly 1, and a state whose row puts all mass on one
 * action records it in `deterministicAction` so rollouts skip the random draw.
 */
export function matrixFromRows(stateCount: number, actionCount: number, rowOf: (state: number) => Float64Array): PolicyMatrix {
  const probability = new Float64Array(stateCount * actionCount);
  const cumulative = new Float64Array(stateCount * actionCount);
  const deterministicAction = new Int32Array(stateCount).fill(-1);
  for (let s = 0; s < stateCount; s++) {
    const row = rowOf(s);
    const total = row.reduce((a, b) => a + b, 0);
    let running = 0;
    let positive = 0;
    let only = -1;
    for (let a = 0; a < actionCount; a++) {
      const p = row[a] / total;
      probability[s * actionCount + a] = p;
      running += p;
      cumulative[s * actionCount + a] = running;
      if (p > 0) {
        positive++;
        only = a;
      }
    }
    cumulative[s * actionCount + actionCount - 1] = 1;
    if (positive === 1) deterministicAction[s] = only;
  }
  return { actionCount, probability, cumulative, deterministicAction };
}

/** The row of state `s`, copied. */
export function matrixRow(matrix: PolicyMatrix, s: number): Float64Array {
  return matrix.probability.slice(s * matrix.actionCount, (s + 1) * matrix.actionCount);
}

/** With probability ε a uniform action, else the base row: ε/n + (1−ε)·base. */
export function epsilonMix(base: PolicyMatrix, stateCount: number, epsilon: number): PolicyMatrix {
  const n = base.actionCount;
  return matrixFromRows(stateCount, n, (s) => matrixRow(base, s).map((p) => epsilon / n + (1 - epsilon) * p));
}

/** Running sums of a row, the last exactly 1. */
export function cumulativeRow(row: Float64Array): Float64Array {
  const total = row.reduce((a, b) => a + b, 0);
  let running = 0;
  const cumulative = row.map((p) => (running += p / total));
  cumulative[cumulative.length - 1] = 1;
  return cumulative;
}

/** The first action whose cumulative probability exceeds u ∈ [0, 1) (zero-probability actions are never chosen). */
export function sampleCumulative(cumulative: Float64Array, u: number): number {
  const last = cumulative.length - 1;
  for (let a = 0; a < last; a++) if (u < cumulative[a]) return a;
  return last;
}
