import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { eventHappens, type RiskRequest } from '../options/risk-options.js';
import { InputError } from '../errors.js';
import { describeTerminals, terminalStates, terminalsNamed } from '../definitions/terminal-states.js';
import { exactEndings, exactQuantile, exactReturnDistribution, exactTailMean, type EpisodeEndings, type ReturnDistribution } from './return-distribution.js';

/** Exact risk figures of a policy on a finite MDP: the oracle the sampled ones are checked against. */
export interface ExactRisk {
  readonly endings: EpisodeEndings;
  /** Null when the return takes too many distinct values to enumerate; `reason` says why. */
  readonly distribution: ReturnDistribution | null;
  readonly reason: string | null;
  readonly quantiles: readonly { readonly p: number; readonly value: number }[] | null;
  readonly tailMean: { readonly tail: number; readonly value: number } | null;
  /** Each event's exact probability; null for a return event when the distribution is unknown. */
  readonly events: readonly { readonly event: string; readonly probability: number | null }[];
}

export function exactRisk(mdp: FiniteMdp, policy: PolicyMatrix, start: number | undefined, request: RiskRequest): ExactRisk {
  const endings = exactEndings(mdp, policy, start);
  const enumerated = exactReturnDistribution(mdp, policy, start);
  const distribution = enumerated.ok ? enumerated.distribution : null;
  const terminals = terminalStates(mdp);
  const events = request.events.map((event) => {
    if (event.subject === 'terminal') {
      const states = terminalsNamed(event.terminal!, terminals);
      if (states.length === 0) {
        throw new InputError('--event', `"${event.text}": no terminal cell letter or terminal state is named "${event.terminal}"; ${terminals.length === 0 ? 'this environment has no terminal states' : `its terminals are ${describeTerminals(terminals)}`}`);
      }
      let probability = 0;
      for (const s of states) probability += endings.terminalProbability[s];
      return { event: event.text, probability };
    }
    if (event.subject === 'length') {
      // P(length = k) = P(≥ k) − P(≥ k + 1); lengths run 0 … H.
      let probability = 0;
      const H = endings.lengthAtLeast.length - 1;
      for (let k = 0; k <= H; k++) {
        if (!eventHappens(event, k)) continue;
        probability += endings.lengthAtLeast[k] - (k < H ? endings.lengthAtLeast[k + 1] : 0);
      }
      return { event: event.text, probability };
    }
    if (!distribution) return { event: event.text, probability: null };
    let probability = 0;
    for (let i = 0; i < distribution.returns.length; i++) if (eventHappens(event, distribution.returns[i])) probability += distribution.probabilities[i];
    return { event: event.text, probability };
  });
  return {
    endings,
    distribution,
    reason: enumerated.ok ? null : enumerated.reason,
    quantiles: distribution ? request.quantiles.map((p) => ({ p, value: exactQuantile(distribution, p) })) : null,
    tailMean: distribution ? { tail: request.tail, value: exactTailMean(distribution, request.tail) } : null,
    events,
  };
}
