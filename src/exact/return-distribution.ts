import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';
import { checkPolicyFits } from './policy-chain.js';
import { startDistribution } from './start-distribution.js';

/** Distinct returns kept at most while the distribution is built; beyond, it is not computed. */
export const MAX_RETURN_ATOMS = 100_000;
/** Returns closer than this (relative) are one atom: sums in another order differ in the last bits. */
const KEY_SCALE = 1e9;

/** The exact law of the horizon-H return and of how episodes end, for a policy on a finite MDP. */
export interface ReturnDistribution {
  /** Distinct returns, ascending, and their probabilities. */
  readonly returns: Float64Array;
  readonly probabilities: Float64Array;
  /** P(the episode ends on arriving in state s), by state index (0 for non-terminal states). */
  readonly terminalProbability: Float64Array;
  /** P(length ≥ k) for k = 0 … H (index k). */
  readonly lengthAtLeast: Float64Array;
  /** P(the episode runs all H steps without reaching a terminal state). */
  readonly truncated: number;
}

export type ReturnDistributionResult = { readonly ok: true; readonly distribution: ReturnDistribution } | { readonly ok: false; readonly reason: string };

/**
 * Enumerates the return exactly: the joint law of (state, return so far) after t steps, pushed
 * through the policy and the transition table one step at a time (the forward equations of the
 * Markov chain the policy induces; e.g. Puterman 1994, Markov Decision Processes, §2.1), with
 * atoms of equal return merged. Mass that reaches a terminal state, or is still alive after H
 * steps, adds to the final law. Feasible while the distinct (state, return) pairs stay few,
 * as for deterministic rewards on small grids; past {@link MAX_RETURN_ATOMS} it says so.
 */
export function exactReturnDistribution(mdp: FiniteMdp, policy: PolicyMatrix, start?: number, maxAtoms = MAX_RETURN_ATOMS): ReturnDistributionResult {
  checkPolicyFits(mdp, policy);
  const mu = startDistribution(mdp, start);
  const A = mdp.actionCount;
  const H = mdp.horizon;
  const finalLaw = new Map<number, [number, number]>();
  const addFinal = (g: number, p: number) => {
    const key = Math.round(g * KEY_SCALE);
    const atom = finalLaw.get(key);
    if (atom) atom[1] += p;
    else finalLaw.set(key, [g, p]);
  };
  const terminalProbability = new Float64Array(mdp.stateCount);
  const lengthAtLeast = new Float64Array(H + 1);
  lengthAtLeast[0] = 1;
  // live[s]: return key → [return, probability] for episodes in state s, not yet ended
  let live = new Map<number, Map<number, [number, number]>>();
  for (let s = 0; s < mdp.stateCount; s++) {
    if (!(mu[s] > 0)) continue;
    if (mdp.terminal[s]) {
      terminalProbability[s] += mu[s];
      addFinal(0, mu[s]);
    } else {
      live.set(s, new Map([[0, [0, mu[s]]]]));
    }
  }
  let discountNow = 1;
  for (let t = 0; t < H && live.size > 0; t++) {
    let aliveMass = 0;
    for (const atoms of live.values()) for (const [, p] of atoms.values()) aliveMass += p;
    lengthAtLeast[t + 1] = aliveMass;
    const next = new Map<number, Map<number, [number, number]>>();
    let atomCount = 0;
    for (const [s, atoms] of live) {
      for (let a = 0; a < A; a++) {
        const pa = policy.probability[s * A + a];
        if (!(pa > 0)) continue;
        const sa = s * A + a;
        for (let k = mdp.outcomeStart[sa]; k < mdp.outcomeStart[sa + 1]; k++) {
          const to = mdp.outcomeNext[k];
          const weight = pa * mdp.outcomeProbability[k];
          const reward = discountNow * mdp.outcomeReward[k];
          for (const [g, p] of atoms.values()) {
            const g2 = g + reward;
            const p2 = p * weight;
            if (mdp.terminal[to]) {
              terminalProbability[to] += p2;
              addFinal(g2, p2);
              continue;
            }
            let target = next.get(to);
            if (!target) next.set(to, (target = new Map()));
            const key = Math.round(g2 * KEY_SCALE);
            const atom = target.get(key);
            if (atom) atom[1] += p2;
            else {
              target.set(key, [g2, p2]);
              if (++atomCount > maxAtoms) {
                return { ok: false, reason: `more than ${maxAtoms.toLocaleString('en')} distinct (state, return) pairs after ${t + 1} steps: the exact return distribution is too large to enumerate` };
              }
            }
          }
        }
      }
    }
    live = next;
    discountNow *= mdp.discount;
  }
  let truncated = 0;
  for (const atoms of live.values()) for (const [g, p] of atoms.values()) {
    truncated += p;
    addFinal(g, p);
  }
  if (finalLaw.size > maxAtoms) return { ok: false, reason: `more than ${maxAtoms.toLocaleString('en')} distinct returns` };
  const sorted = [...finalLaw.values()].sort((x, y) => x[0] - y[0]);
  return {
    ok: true,
    distribution: {
      returns: Float64Array.from(sorted, (x) => x[0]),
      probabilities: Float64Array.from(sorted, (x) => x[1]),
      terminalProbability,
      lengthAtLeast,
      truncated,
    },
  };
}

/** P(G < x) (or ≤ with `inclusive`) under an exact distribution. */
export function exactProbabilityBelow(d: ReturnDistribution, x: number, inclusive = false): number {
  let p = 0;
  for (let i = 0; i < d.returns.length; i++) if (d.returns[i] < x || (inclusive && d.returns[i] === x)) p += d.probabilities[i];
  return p;
}

/** Lower-tail CVaR_α = (1/α)∫₀^α F⁻¹(u) du of an exact distribution (Rockafellar & Uryasev 2000). */
export function exactTailMean(d: ReturnDistribution, tail: number): number {
  let mass = 0;
  let sum = 0;
  for (let i = 0; i < d.returns.length && mass < tail; i++) {
    const take = Math.min(d.probabilities[i], tail - mass);
    sum += take * d.returns[i];
    mass += take;
  }
  return sum / tail;
}

/** The p-quantile inf{x : F(x) ≥ p} of an exact distribution. */
export function exactQuantile(d: ReturnDistribution, p: number): number {
  let mass = 0;
  for (let i = 0; i < d.returns.length; i++) {
    mass += d.probabilities[i];
    if (mass >= p - 1e-12) return d.returns[i];
  }
  return d.returns[d.returns.length - 1];
}

/** How episodes end under a policy: always computable, whatever the number of distinct returns. */
export interface EpisodeEndings {
  /** P(the episode ends on arriving in state s). */
  readonly terminalProbability: Float64Array;
  /** P(length ≥ k), k = 0 … H. */
  readonly lengthAtLeast: Float64Array;
  /** P(all H steps run without reaching a terminal state). */
  readonly truncated: number;
}

/**
 * The state distribution pushed forward H steps under the policy (the chain's forward equations),
 * with the mass that arrives in terminal states taken out as it arrives: the probability of
 * ending in each terminal state, of each length, and of truncation at the horizon.
 */
export function exactEndings(mdp: FiniteMdp, policy: PolicyMatrix, start?: number): EpisodeEndings {
  checkPolicyFits(mdp, policy);
  const A = mdp.actionCount;
  const H = mdp.horizon;
  let mass = Float64Array.from(startDistribution(mdp, start));
  const terminalProbability = new Float64Array(mdp.stateCount);
  for (let s = 0; s < mdp.stateCount; s++) {
    if (mdp.terminal[s] && mass[s] > 0) {
      terminalProbability[s] += mass[s];
      mass[s] = 0;
    }
  }
  const lengthAtLeast = new Float64Array(H + 1);
  lengthAtLeast[0] = 1;
  for (let t = 0; t < H; t++) {
    let alive = 0;
    for (let s = 0; s < mdp.stateCount; s++) alive += mass[s];
    lengthAtLeast[t + 1] = alive;
    if (alive === 0) break;
    const next = new Float64Array(mdp.stateCount);
    for (let s = 0; s < mdp.stateCount; s++) {
      const m = mass[s];
      if (!(m > 0)) continue;
      for (let a = 0; a < A; a++) {
        const pa = policy.probability[s * A + a];
        if (!(pa > 0)) continue;
        const sa = s * A + a;
        for (let k = mdp.outcomeStart[sa]; k < mdp.outcomeStart[sa + 1]; k++) {
          const to = mdp.outcomeNext[k];
          const p = m * pa * mdp.outcomeProbability[k];
          if (mdp.terminal[to]) terminalProbability[to] += p;
          else next[to] += p;
        }
      }
    }
    mass = next;
  }
  let truncated = 0;
  for (let s = 0; s < mdp.stateCount; s++) truncated += mass[s];
  return { terminalProbability, lengthAtLeast, truncated };
}
