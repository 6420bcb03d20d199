// Seeded random tabular MDPs for the benchmark: `states` states of which the last `terminals`
// are terminal, `actions` actions, `successors` distinct next states for every (state, action)
// with random probabilities and rewards. Each successor slot is a terminal state with chance
// `terminalChance`, so an episode ends with about that probability per step (0.008 gives
// episodes of about 120 steps under a 400-step horizon). Invented data, for timing only.
import { streamFor } from '../../dist/engine/streams.js';

export function randomMdpRows({ states, actions = 4, successors = 3, terminals = 2, terminalChance = 0.008, seed = 2024 }) {
  const rng = streamFor(seed, 0x5b, states);
  const open = states - terminals;
  const rows = []; // rows[s * actions + a] = [{ next, probability, reward }]
  for (let s = 0; s < states; s++) {
    for (let a = 0; a < actions; a++) {
      if (s >= open) {
        rows.push([{ next: s, probability: 1, reward: 0 }]);
        continue;
      }
      const chosen = new Set();
      while (chosen.size < Math.min(successors, states)) {
        const next = terminals > 0 && rng.uniform() < terminalChance ? open + rng.integer(terminals) : rng.integer(open);
        chosen.add(next);
      }
      const weights = [...chosen].map(() => 0.2 + rng.uniform());
      const total = weights.reduce((x, y) => x + y, 0);
      const row = [...chosen].map((next, k) => ({ next, probability: weights[k] / total, reward: Math.round(200 * rng.uniform() - 100) / 100 }));
      rows.push(row.sort((x, y) => x.next - y.next));
    }
  }
  return { states, actions, terminals, rows };
}

/** The MDP as a reckon tabular definition file (start: uniform over non-terminal states). */
export function tabularDefinition(mdp, { discount, horizon }) {
  const name = (s) => `s${s}`;
  const actionNames = Array.from({ length: mdp.actions }, (_, a) => `a${a}`);
  const transitions = [];
  for (let s = 0; s < mdp.states - mdp.terminals; s++) {
    for (let a = 0; a < mdp.actions; a++) {
      for (const o of mdp.rows[s * mdp.actions + a]) {
        transitions.push({ from: name(s), action: actionNames[a], to: name(o.next), p: o.probability, reward: o.reward });
      }
    }
  }
  return {
    kind: 'tabular',
    description: `random MDP for the benchmark: ${mdp.states} states, ${mdp.actions} actions`,
    discount,
    horizon,
    states: Array.from({ length: mdp.states }, (_, s) => name(s)),
    actions: actionNames,
    terminal: Array.from({ length: mdp.terminals }, (_, k) => name(mdp.states - mdp.terminals + k)),
    transitions,
  };
}

/**
 * The same MDP directly in the engine's compiled form (the fields the rollout loop reads), for
 * sizes whose definition files would take longer to parse than to run (100,000 states).
 */
export function compiledMdp(mdp, { discount, horizon }) {
  const { states, actions, rows } = mdp;
  const outcomeCount = rows.reduce((n, row) => n + row.length, 0);
  const outcomeStart = new Int32Array(states * actions + 1);
  const outcomeNext = new Int32Array(outcomeCount);
  const outcomeProbability = new Float64Array(outcomeCount);
  const outcomeCumulative = new Float64Array(outcomeCount);
  const outcomeReward = new Float64Array(outcomeCount);
  let k = 0;
  rows.forEach((row, sa) => {
    outcomeStart[sa] = k;
    let running = 0;
    for (const o of row) {
      running += o.probability;
      outcomeNext[k] = o.next;
      outcomeProbability[k] = o.probability;
      outcomeCumulative[k] = running;
      outcomeReward[k] = o.reward;
      k++;
    }
    outcomeCumulative[k - 1] = 1;
  });
  outcomeStart[rows.length] = k;
  const terminal = new Uint8Array(states);
  terminal.fill(1, states - mdp.terminals);
  const startProbability = new Float64Array(states).fill(1 / (states - mdp.terminals), 0, states - mdp.terminals);
  return {
    stateNames: [],
    actionNames: Array.from({ length: actions }, (_, a) => `a${a}`),
    stateCount: states,
    actionCount: actions,
    terminal,
    startProbability,
    outcomeStart,
    outcomeNext,
    outcomeProbability,
    outcomeCumulative,
    outcomeReward,
    discount,
    horizon,
    horizonDerived: false,
    rewardRange: [-1, 1],
    stateIndex: new Map(),
  };
}

/** The uniform random policy in the engine's matrix form. */
export function uniformPolicyMatrix(states, actions) {
  const probability = new Float64Array(states * actions).fill(1 / actions);
  const cumulative = new Float64Array(states * actions);
  for (let s = 0; s < states; s++) {
    let running = 0;
    for (let a = 0; a < actions; a++) cumulative[s * actions + a] = running += 1 / actions;
    cumulative[s * actions + actions - 1] = 1;
  }
  return { actionCount: actions, probability, cumulative, deterministicAction: new Int32Array(states).fill(-1) };
}
