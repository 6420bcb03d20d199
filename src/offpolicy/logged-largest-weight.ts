/**
 * The largest importance weight when the behaviour policy is known only from the log's
 * `behaviour_probs`. On a finite environment, the states the behaviour can reach from the
 * logged first states are found by search: through every action it gives positive
 * probability and every successor of positive probability. When each of them has a logged
 * distribution, the behaviour is known wherever an episode can go, and the dynamic programme
 * of largest-weight.ts bounds every weight. Where the log gives an action different
 * probabilities on different lines, the smallest one is taken: a smaller μ only raises the
 * bound, so it stays valid.
 */
import type { EpisodeLog } from '../definitions/episode-log.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { largestWeight } from './largest-weight.js';

export type LoggedLargestWeight =
  | { readonly ok: true; readonly weight: number }
  /** A state the behaviour can reach whose distribution no line of the log gives. */
  | { readonly ok: false; readonly missing: string };

export function loggedLargestWeight(log: EpisodeLog, mdp: FiniteMdp, target: PolicyMatrix, starts: readonly number[]): LoggedLargestWeight {
  const { stateCount, actionCount, terminal, outcomeStart, outcomeNext, stateNames, actionNames } = mdp;
  const logState = new Map(log.stateNames.map((name, s) => [name, s]));
  const logAction = actionNames.map((name) => log.actionNames.indexOf(name));
  const width = log.actionNames.length;
  const behaviour = new Float64Array(stateCount * actionCount);
  const seen = new Uint8Array(stateCount);
  const queue = [...starts];
  for (const s of starts) seen[s] = 1;
  while (queue.length > 0) {
    const s = queue.pop()!;
    if (terminal[s]) continue;
    const row = logState.get(stateNames[s]);
    if (row === undefined || Number.isNaN(log.behaviourDistribution[row * width])) return { ok: false, missing: stateNames[s] };
    for (let a = 0; a < actionCount; a++) {
      // An action the log never names has probability 0: each logged distribution sums to 1 over the named ones.
      const mu = logAction[a] < 0 ? 0 : log.behaviourDistribution[row * width + logAction[a]];
      behaviour[s * actionCount + a] = mu;
      if (!(mu > 0)) continue;
      const sa = s * actionCount + a;
      for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) {
        const next = outcomeNext[k];
        if (!seen[next]) {
          seen[next] = 1;
          queue.push(next);
        }
      }
    }
  }
  return { ok: true, weight: largestWeight(mdp, target, { probability: behaviour }, starts) };
}
