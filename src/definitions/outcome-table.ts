/**
 * Assembles the flat {@link FiniteMdp} arrays from per-(state, action) outcome lists, so
 * gridworlds and tabular MDPs share one way of merging outcomes, laying out cumulative
 * sums and resolving the horizon.
 */
import type { FiniteMdp, GridShape } from './finite-mdp.js';
import { DEFAULT_TRUNCATION_TOLERANCE, resolveHorizon } from './horizon.js';

export interface Outcome {
  readonly next: number;
  readonly probability: number;
  readonly reward: number;
}

export interface FiniteMdpParts {
  readonly stateNames: readonly string[];
  readonly actionNames: readonly string[];
  readonly terminal: Uint8Array;
  readonly startProbability: Float64Array;
  /** Outcomes of taking `action` in the non-terminal `state`, unmerged, in any order. */
  outcomesOf(state: number, action: number): readonly Outcome[];
  readonly discount: number;
  readonly horizon: number | undefined;
  readonly truncationTolerance: number | undefined;
  readonly grid?: GridShape;
  /** Label for errors (the definition file). */
  readonly where: string;
}

/** Merges outcomes with the same next state and reward, drops zero probabilities, orders by (next, reward). */
export function mergeOutcomes(outcomes: readonly Outcome[]): Outcome[] {
  const merged = new Map<string, Outcome>();
  for (const o of outcomes) {
    if (o.probability <= 0) continue;
    const key = `${o.next}|${o.reward}`;
    const previous = merged.get(key);
    merged.set(key, previous ? { ...previous, probability: previous.probability + o.probability } : o);
  }
  return [...merged.values()].sort((a, b) => a.next - b.next || a.reward - b.reward);
}

/**
 * Builds the finite MDP. Terminal states get a self-loop of reward 0 for every action,
 * never used by rollouts but keeping every row well formed. The reward range and the
 * derived horizon count only non-terminal rows, the rewards an episode can actually earn.
 */
export function assembleFiniteMdp(parts: FiniteMdpParts): FiniteMdp {
  const stateCount = parts.stateNames.length;
  const actionCount = parts.actionNames.length;
  const rows: Outcome[][] = [];
  let minReward = Infinity;
  let maxReward = -Infinity;
  for (let s = 0; s < stateCount; s++) {
    for (let a = 0; a < actionCount; a++) {
      if (parts.terminal[s]) {
        rows.push([{ next: s, probability: 1, reward: 0 }]);
        continue;
      }
      const row = mergeOutcomes(parts.outcomesOf(s, a));
      for (const o of row) {
        minReward = Math.min(minReward, o.reward);
        maxReward = Math.max(maxReward, o.reward);
      }
      rows.push(row);
    }
  }
  if (minReward > maxReward) minReward = maxReward = 0;

  const outcomeCount = rows.reduce((n, row) => n + row.length, 0);
  const outcomeStart = new Int32Array(stateCount * actionCount + 1);
  const outcomeNext = new Int32Array(outcomeCount);
  const outcomeProbability = new Float64Array(outcomeCount);
  const outcomeCumulative = new Float64Array(outcomeCount);
  const outcomeReward = new Float64Array(outcomeCount);
  let k = 0;
  rows.forEach((row, sa) => {
    outcomeStart[sa] = k;
    const total = row.reduce((sum, o) => sum + o.probability, 0);
    let running = 0;
    for (const o of row) {
      const p = o.probability / total; // files may be off by up to 1e-9; rows must sum to 1
      running += p;
      outcomeNext[k] = o.next;
      outcomeProbability[k] = p;
      outcomeCumulative[k] = running;
      outcomeReward[k] = o.reward;
      k++;
    }
    outcomeCumulative[k - 1] = 1;
  });
  outcomeStart[rows.length] = k;

  const maxAbsReward = Math.max(Math.abs(minReward), Math.abs(maxReward));
  const { horizon, horizonDerived } = resolveHorizon(
    parts.discount,
    parts.horizon,
    maxAbsReward,
    parts.truncationTolerance ?? DEFAULT_TRUNCATION_TOLERANCE,
    parts.where,
  );
  const stateIndex = new Map<string, number>();
  parts.stateNames.forEach((name, i) => stateIndex.set(name, i));

  return {
    stateNames: parts.stateNames,
    actionNames: parts.actionNames,
    stateCount,
    actionCount,
    terminal: parts.terminal,
    startProbability: parts.startProbability,
    outcomeStart,
    outcomeNext,
    outcomeProbability,
    outcomeCumulative,
    outcomeReward,
    discount: parts.discount,
    horizon,
    horizonDerived,
    rewardRange: [minReward, maxReward],
    ...(parts.grid ? { grid: parts.grid } : {}),
    stateIndex,
  };
}

/** Normalises weights into a probability vector (the caller has checked the total is positive). */
export function normalise(weights: Float64Array): Float64Array {
  const total = weights.reduce((a, b) => a + b, 0);
  return weights.map((w) => w / total);
}
