/**
 * The largest importance weight W = Π_t π(a_t|s_t)/μ(a_t|s_t) any episode can have, when both
 * policies are known on a finite environment: dynamic programming over the horizon on the
 * largest product (Bellman's principle applied to a product of non-negative factors; common
 * practice):
 *   M_0(s) = 1,  M_h(s) = max over a with μ(a|s) > 0 and successors s' with p > 0 of
 *            π(a|s)/μ(a|s) · (1 if s' is terminal, else M_{h−1}(s')),
 * and the answer is the largest M_H over the start states. With it the weighted returns are
 * bounded, so a two-sided bounded-mean interval applies.
 */
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';

export function largestWeight(mdp: FiniteMdp, target: Pick<PolicyMatrix, 'probability'>, behaviour: Pick<PolicyMatrix, 'probability'>, starts: readonly number[]): number {
  const { stateCount, actionCount, terminal, outcomeStart, outcomeNext } = mdp;
  let previous = new Float64Array(stateCount).fill(1);
  let current = new Float64Array(stateCount);
  for (let h = 1; h <= mdp.horizon; h++) {
    let changed = false;
    for (let s = 0; s < stateCount; s++) {
      if (terminal[s]) {
        current[s] = 1;
        continue;
      }
      let best = 0;
      for (let a = 0; a < actionCount; a++) {
        const mu = behaviour.probability[s * actionCount + a];
        if (!(mu > 0)) continue;
        const ratio = target.probability[s * actionCount + a] / mu;
        if (ratio === 0) continue;
        let ahead = 0;
        const sa = s * actionCount + a;
        for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) {
          const next = outcomeNext[k];
          ahead = Math.max(ahead, terminal[next] ? 1 : previous[next]);
        }
        best = Math.max(best, ratio * ahead);
      }
      current[s] = best;
      if (best !== previous[s]) changed = true;
    }
    [previous, current] = [current, previous];
    if (!changed) break; // every later step would give the same
  }
  let largest = 0;
  for (const s of starts) largest = Math.max(largest, previous[s]);
  return largest;
}
