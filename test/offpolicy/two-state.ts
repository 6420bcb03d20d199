/**
 * The 2-state example of docs/methods.md §13 written out for tests (the same numbers as
 * test/fixtures/off-policy/two-state-env.json and scripts/methods/off_policy.py).
 */
export const TWO_STATE = {
  /** P(next = 0 | s, a). */
  toZero: [[0.8, 0.3], [0.6, 0.1]],
  reward: [[0, 0.2], [0.5, 1]],
  behaviour: [[0.7, 0.3], [0.5, 0.5]],
  target: [[0.2, 0.8], [0.1, 0.9]],
  discount: 0.9,
  horizon: 3,
};

/** Q^π_t(s, a), t = 0..2, by backward induction from V_3 = 0. */
export function twoStateQ(policy: number[][]): number[][][] {
  const { toZero, reward, discount, horizon } = TWO_STATE;
  const q: number[][][] = [];
  let next = [0, 0];
  for (let t = horizon - 1; t >= 0; t--) {
    const qt = [0, 1].map((s) => [0, 1].map((a) => reward[s][a] + discount * (toZero[s][a] * next[0] + (1 - toZero[s][a]) * next[1])));
    q[t] = qt;
    next = [0, 1].map((s) => policy[s][0] * qt[s][0] + policy[s][1] * qt[s][1]);
  }
  return q;
}

export interface Trajectory {
  states: number[];
  actions: number[];
  reward: number[];
  /** ρ_{0:t}. */
  weight: number[];
  /** Its probability under the behaviour. */
  probability: number;
}

/** All 32 trajectories from state 0 with their behaviour probabilities. */
export function twoStateTrajectories(): Trajectory[] {
  const { toZero, reward, behaviour, target } = TWO_STATE;
  const out: Trajectory[] = [];
  for (let code = 0; code < 32; code++) {
    const bits = [0, 1, 2, 3, 4].map((b) => (code >> b) & 1);
    const states = [0, bits[1], bits[3]];
    const actions = [bits[0], bits[2], bits[4]];
    let probability = 1;
    let w = 1;
    const weight: number[] = [];
    for (let t = 0; t < 3; t++) {
      const s = states[t];
      const a = actions[t];
      probability *= behaviour[s][a];
      if (t < 2) probability *= states[t + 1] === 0 ? toZero[s][a] : 1 - toZero[s][a];
      w *= target[s][a] / behaviour[s][a];
      weight.push(w);
    }
    out.push({ states, actions, reward: states.map((s, t) => reward[s][actions[t]]), weight, probability });
  }
  return out;
}
