import type { FiniteMdp } from '../definitions/finite-mdp.js';
import type { ExactResult } from '../exact/index.js';
import { fixed, sig } from './format.js';
import { gridMap } from './grid-map.js';

/** Plain-text report of an exact evaluation; gridworld values are drawn as a map. */
export function exactText(mdp: FiniteMdp, result: ExactResult, labels: { env: string; policy: string; start: string | null }): string {
  const from = labels.start ? `from state ${labels.start}` : 'from the start distribution';
  const lines = [
    `Exact evaluation of ${labels.policy} in ${labels.env}, ${from}`,
    '',
    `  value            ${sig(result.value, 6)}   (expected return over at most ${result.horizon} steps: what 'estimate' samples)`,
    `  std of return    ${sig(result.std, 6)}`,
    `  untruncated      ${result.value_infinite === null ? 'none: from here the episode may never end (discount 1)' : sig(result.value_infinite, 6)}`,
  ];
  if (mdp.grid) {
    lines.push('', '  State values (horizon ' + result.horizon + '; # wall, * terminal):');
    lines.push(
      ...gridMap(mdp.grid, (s) => (mdp.terminal[s] ? '*' : fixed(result.states[s], 3))),
    );
  } else if (mdp.stateCount <= 40) {
    lines.push('', '  State values:');
    mdp.stateNames.forEach((name, s) => lines.push(`    ${name.padEnd(16)} ${mdp.terminal[s] ? '(terminal)' : sig(result.states[s], 6)}`));
  }
  return lines.join('\n') + '\n';
}
