/**
 * Iterative policy evaluation V ← r_π + γ P_π V (Sutton & Barto 2018, eq. 4.5), written
 * here independently of src/exact so compiled definitions can be checked against
 * published values.
 */
import type { FiniteMdp, PolicyMatrix } from '../../src/definitions/finite-mdp.js';

export function evaluatePolicy(mdp: FiniteMdp, policy: PolicyMatrix, tolerance = 1e-12, maxSweeps = 100_000): Float64Array {
  const n = mdp.actionCount;
  let v = new Float64Array(mdp.stateCount);
  for (let sweep = 0; sweep < maxSweeps; sweep++) {
    const next = new Float64Array(mdp.stateCount);
    let change = 0;
    for (let s = 0; s < mdp.stateCount; s++) {
      if (mdp.terminal[s]) continue;
      let value = 0;
      for (let a = 0; a < n; a++) {
        const pa = policy.probability[s * n + a];
        if (pa === 0) continue;
        const sa = s * n + a;
        for (let k = mdp.outcomeStart[sa]; k < mdp.outcomeStart[sa + 1]; k++) {
          value += pa * mdp.outcomeProbability[k] * (mdp.outcomeReward[k] + mdp.discount * v[mdp.outcomeNext[k]]);
        }
      }
      next[s] = value;
      change = Math.max(change, Math.abs(value - v[s]));
    }
    v = next;
    if (change < tolerance) return v;
  }
  throw new Error('policy evaluation did not converge');
}

/** The outcomes of (state, action) as {next state name: [probability, reward]} for readable assertions. */
export function outcomesByName(mdp: FiniteMdp, state: string, action: string): Array<[string, number, number]> {
  const sa = mdp.stateIndex.get(state)! * mdp.actionCount + mdp.actionNames.indexOf(action);
  const rows: Array<[string, number, number]> = [];
  for (let k = mdp.outcomeStart[sa]; k < mdp.outcomeStart[sa + 1]; k++) {
    rows.push([mdp.stateNames[mdp.outcomeNext[k]], mdp.outcomeProbability[k], mdp.outcomeReward[k]]);
  }
  return rows.sort((x, y) => x[0].localeCompare(y[0]) || x[2] - y[2]);
}
