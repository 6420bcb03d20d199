import type { FiniteMdp, PolicyMatrix } from '../../src/definitions/finite-mdp.js';

/** One outcome of taking `action` in `from`. */
export interface TransitionSpec {
  from: number;
  action: number;
  to: number;
  p: number;
  reward: number;
}

export interface MdpSpec {
  stateCount: number;
  actionCount: number;
  transitions: readonly TransitionSpec[];
  /** Start states with their probabilities. */
  start: ReadonlyArray<readonly [state: number, p: number]>;
  terminal?: readonly number[];
  discount: number;
  horizon: number;
}

/**
 * Builds the compiled form directly from a transition list, for tests that must not depend on
 * the definition loaders: outcomes sorted by (state, action), same (next, reward) merged,
 * cumulative sums with the last of each pair forced to 1. States are named s0, s1, …
 */
export function buildMdp(spec: MdpSpec): FiniteMdp {
  const { stateCount, actionCount } = spec;
  const pairs: Array<Array<{ to: number; p: number; reward: number }>> = Array.from(
    { length: stateCount * actionCount },
    () => [],
  );
  for (const t of spec.transitions) {
    const list = pairs[t.from * actionCount + t.action];
    const same = list.find((o) => o.to === t.to && o.reward === t.reward);
    if (same) same.p += t.p;
    else list.push({ to: t.to, p: t.p, reward: t.reward });
  }
  const outcomeStart = new Int32Array(stateCount * actionCount + 1);
  const next: number[] = [];
  const prob: number[] = [];
  const cum: number[] = [];
  const rew: number[] = [];
  pairs.forEach((list, sa) => {
    let running = 0;
    list.forEach((o, i) => {
      running += o.p;
      next.push(o.to);
      prob.push(o.p);
      rew.push(o.reward);
      cum.push(i === list.length - 1 ? 1 : running);
    });
    outcomeStart[sa + 1] = next.length;
  });
  const terminal = new Uint8Array(stateCount);
  for (const s of spec.terminal ?? []) terminal[s] = 1;
  const startProbability = new Float64Array(stateCount);
  for (const [s, p] of spec.start) startProbability[s] += p;
  const rewards = spec.transitions.map((t) => t.reward);
  const stateNames = Array.from({ length: stateCount }, (_, i) => `s${i}`);
  return {
    stateNames,
    actionNames: Array.from({ length: actionCount }, (_, i) => `a${i}`),
    stateCount,
    actionCount,
    terminal,
    startProbability,
    outcomeStart,
    outcomeNext: Int32Array.from(next),
    outcomeProbability: Float64Array.from(prob),
    outcomeCumulative: Float64Array.from(cum),
    outcomeReward: Float64Array.from(rew),
    discount: spec.discount,
    horizon: spec.horizon,
    horizonDerived: false,
    rewardRange: [Math.min(...rewards), Math.max(...rewards)],
    stateIndex: new Map(stateNames.map((name, i) => [name, i])),
  };
}

/** A policy from a per-state table of action probabilities (rows sum to 1). */
export function policyFromTable(table: readonly (readonly number[])[]): PolicyMatrix {
  const actionCount = table[0].length;
  const probability = Float64Array.from(table.flat());
  const cumulative = new Float64Array(probability.length);
  const deterministicAction = new Int32Array(table.length).fill(-1);
  table.forEach((row, s) => {
    let running = 0;
    row.forEach((p, a) => {
      running += p;
      cumulative[s * actionCount + a] = a === actionCount - 1 ? 1 : running;
      if (p === 1) deterministicAction[s] = a;
    });
  });
  return { actionCount, probability, cumulative, deterministicAction };
}

/** Uniform over all actions in every state. */
export function uniformPolicy(stateCount: number, actionCount: number): PolicyMatrix {
  return policyFromTable(Array.from({ length: stateCount }, () => Array(actionCount).fill(1 / actionCount)));
}

/** mulberry32: a tiny seeded generator so random test MDPs are reproducible (common practice). */
export function seededUniform(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
