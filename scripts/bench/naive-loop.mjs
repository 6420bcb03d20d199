// The second reference point: the rollout loop written the way a user would first write it,
// over objects keyed by state and action names, with a new generator object per episode and
// probabilities summed as it goes. Same streams and the same draws as the engine, so it must
// reproduce the engine's returns exactly; it only shows what the engine's flat tables buy.
import { STREAM, streamFor } from '../../dist/engine/streams.js';

/** Objects from the compiled tables: { name: { terminal, actions: { action: [{ to, p, reward }] } } }. */
export function objectModel(mdp, matrix) {
  const states = {};
  const policy = {};
  mdp.stateNames.forEach((name, s) => {
    const actions = {};
    mdp.actionNames.forEach((action, a) => {
      const sa = s * mdp.actionCount + a;
      actions[action] = [];
      for (let k = mdp.outcomeStart[sa]; k < mdp.outcomeStart[sa + 1]; k++) {
        actions[action].push({ to: mdp.stateNames[mdp.outcomeNext[k]], p: mdp.outcomeProbability[k], reward: mdp.outcomeReward[k] });
      }
    });
    states[name] = { terminal: mdp.terminal[s] === 1, actions };
    policy[name] = mdp.actionNames
      .map((action, a) => ({ action, p: matrix.probability[s * mdp.actionCount + a] }))
      .filter((choice) => choice.p > 0);
  });
  const start = mdp.stateNames.map((name, s) => ({ state: name, p: mdp.startProbability[s] })).filter((x) => x.p > 0);
  return { states, policy, start, discount: mdp.discount, horizon: mdp.horizon };
}

/** The first item whose running sum of `p` exceeds u (the last one if none does). */
function pick(items, u) {
  let sum = 0;
  for (const item of items) {
    sum += item.p;
    if (u < sum) return item;
  }
  return items[items.length - 1];
}

/** Runs episodes [first, first + count); returns per-episode returns and lengths. */
export function runNaive(model, seed, first, count) {
  const returns = new Float64Array(count);
  const lengths = new Uint32Array(count);
  let steps = 0;
  for (let i = 0; i < count; i++) {
    const envRng = streamFor(seed, STREAM.ENV, first + i);
    const policyRng = streamFor(seed, STREAM.POLICY, first + i);
    let state = pick(model.start, envRng.uniform()).state;
    let g = 0;
    let weight = 1;
    let t = 0;
    while (t < model.horizon && !model.states[state].terminal) {
      const choices = model.policy[state];
      const action = choices.length === 1 ? choices[0].action : pick(choices, policyRng.uniform()).action;
      const outcome = pick(model.states[state].actions[action], envRng.uniform());
      g += weight * outcome.reward;
      weight *= model.discount;
      state = outcome.to;
      t++;
    }
    returns[i] = g;
    lengths[i] = t;
    steps += t;
  }
  return { returns, lengths, steps };
}
