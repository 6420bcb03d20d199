import type { FiniteMdp } from '../definitions/finite-mdp.js';
import type { ExactResult } from '../exact/index.js';

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** The `exact --json` object (keys are a contract: value, std, states, value_infinite). */
export function exactJson(mdp: FiniteMdp, result: ExactResult, labels: { env: string; policy: string; start: string | null }) {
  const states: Record<string, number> = {};
  const statesInfinite: Record<string, number | null> = {};
  mdp.stateNames.forEach((name, s) => {
    states[name] = result.states[s];
    statesInfinite[name] = finiteOrNull(result.states_infinite[s]);
  });
  return {
    env: labels.env,
    policy: labels.policy,
    start: labels.start,
    value: result.value,
    std: result.std,
    value_infinite: result.value_infinite,
    horizon: result.horizon,
    horizon_derived: mdp.horizonDerived,
    discount: result.discount,
    states,
    states_infinite: statesInfinite,
  };
}
