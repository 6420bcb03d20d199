import { InputError } from '../errors.js';
import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';

/**
 * The Markov reward process that a fixed policy induces on a finite MDP, in compressed
 * sparse rows. Actions are averaged out with their policy weights and outcomes that lead to
 * the same next state are merged, so each exact recursion is one sparse matrix-vector
 * product per step. Edges into terminal states are dropped from the rows (the value there is
 * 0) but their rewards stay in {@link PolicyChain.meanReward}.
 */
export interface PolicyChain {
  readonly stateCount: number;
  /** Non-terminal states, ascending: the only rows with work to do. */
  readonly liveStates: Int32Array;
  /** Length stateCount + 1; terminal states have empty rows. */
  readonly rowStart: Int32Array;
  /** Next state of each edge (never terminal). */
  readonly edgeNext: Int32Array;
  /** P_π(s, s'): Σ_a π(a|s) Σ_k p_k over outcomes of (s, a) that reach s'. */
  readonly edgeWeight: Float64Array;
  /** Σ_a π(a|s) Σ_k p_k r_k over the same outcomes (the r·V cross term of the second moment). */
  readonly edgeWeightedReward: Float64Array;
  /** r_π(s) = E[r | s], all outcomes including those that end the episode. */
  readonly meanReward: Float64Array;
  /** E[r² | s]. */
  readonly meanSquaredReward: Float64Array;
  /** 1 where some outcome with positive probability under π ends the episode in one step. */
  readonly endsInOneStep: Uint8Array;
  /** Largest |r| of any outcome with positive probability under π. */
  readonly maxAbsReward: number;
}

/** Checks that the policy fits the MDP and that discount and horizon are usable. */
export function checkPolicyFits(mdp: FiniteMdp, policy: PolicyMatrix | null): void {
  if (!(mdp.discount >= 0 && mdp.discount <= 1)) {
    throw new InputError('discount', `must lie in [0, 1], got ${mdp.discount}`);
  }
  if (policy === null) return;
  const expected = mdp.stateCount * mdp.actionCount;
  if (policy.actionCount !== mdp.actionCount || policy.probability.length !== expected) {
    throw new InputError(
      'policy',
      `has ${policy.probability.length} entries for ${policy.actionCount} actions; the environment needs ${expected} (${mdp.stateCount} states × ${mdp.actionCount} actions)`,
    );
  }
}

/** Builds the chain in two passes (count, then fill), merging edges with a per-state scratch table. */
export function buildPolicyChain(mdp: FiniteMdp, policy: PolicyMatrix): PolicyChain {
  checkPolicyFits(mdp, policy);
  const { stateCount, actionCount, terminal, outcomeStart, outcomeNext, outcomeProbability, outcomeReward } = mdp;
  const pi = policy.probability;

  const live: number[] = [];
  for (let s = 0; s < stateCount; s++) if (terminal[s] === 0) live.push(s);
  const liveStates = Int32Array.from(live);

  // slot[s'] = edge index of s' in the row being built, or -1; reset after each row.
  const slot = new Int32Array(stateCount).fill(-1);
  const rowStart = new Int32Array(stateCount + 1);
  let edgeCount = 0;
  for (const s of liveStates) {
    const first = edgeCount;
    for (let a = 0; a < actionCount; a++) {
      const sa = s * actionCount + a;
      if (!(pi[sa] > 0)) continue;
      for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) {
        const next = outcomeNext[k];
        if (outcomeProbability[k] > 0 && terminal[next] === 0 && slot[next] < 0) slot[next] = edgeCount++;
      }
    }
    resetSlots(mdp, pi, s, slot);
    rowStart[s + 1] = edgeCount - first;
  }
  // Turn per-row counts into offsets (terminal rows have count 0).
  for (let s = 0; s < stateCount; s++) rowStart[s + 1] += rowStart[s];

  const edgeNext = new Int32Array(edgeCount);
  const edgeWeight = new Float64Array(edgeCount);
  const edgeWeightedReward = new Float64Array(edgeCount);
  const meanReward = new Float64Array(stateCount);
  const meanSquaredReward = new Float64Array(stateCount);
  const endsInOneStep = new Uint8Array(stateCount);
  let maxAbsReward = 0;
  for (const s of liveStates) {
    let fill = rowStart[s];
    let policyMass = 0;
    let r1 = 0;
    let r2 = 0;
    for (let a = 0; a < actionCount; a++) {
      const sa = s * actionCount + a;
      const w = pi[sa];
      if (!(w > 0)) continue;
      policyMass += w;
      let outcomeMass = 0;
      for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) {
        const p = outcomeProbability[k];
        const r = outcomeReward[k];
        const next = outcomeNext[k];
        outcomeMass += p;
        if (!(p > 0)) continue;
        maxAbsReward = Math.max(maxAbsReward, Math.abs(r));
        r1 += w * p * r;
        r2 += w * p * r * r;
        if (terminal[next] !== 0) {
          endsInOneStep[s] = 1;
          continue;
        }
        let e = slot[next];
        if (e < 0) {
          e = fill++;
          slot[next] = e;
          edgeNext[e] = next;
        }
        edgeWeight[e] += w * p;
        edgeWeightedReward[e] += w * p * r;
      }
      if (Math.abs(outcomeMass - 1) > 1e-9) {
        throw new InputError(
          mdp.stateNames[s] ?? `state ${s}`,
          `outcomes of action ${mdp.actionNames[a] ?? a} have total probability ${outcomeMass}, not 1`,
        );
      }
    }
    if (Math.abs(policyMass - 1) > 1e-9) {
      throw new InputError('policy', `probabilities in state ${mdp.stateNames[s] ?? s} sum to ${policyMass}, not 1`);
    }
    resetSlots(mdp, pi, s, slot);
    meanReward[s] = r1;
    meanSquaredReward[s] = r2;
  }

  return {
    stateCount,
    liveStates,
    rowStart,
    edgeNext,
    edgeWeight,
    edgeWeightedReward,
    meanReward,
    meanSquaredReward,
    endsInOneStep,
    maxAbsReward,
  };
}

/** Clears the scratch entries touched by state s (cheaper than refilling the whole table). */
function resetSlots(mdp: FiniteMdp, pi: Float64Array, s: number, slot: Int32Array): void {
  const { actionCount, outcomeStart, outcomeNext } = mdp;
  for (let a = 0; a < actionCount; a++) {
    const sa = s * actionCount + a;
    if (!(pi[sa] > 0)) continue;
    for (let k = outcomeStart[sa]; k < outcomeStart[sa + 1]; k++) slot[outcomeNext[k]] = -1;
  }
}
