import type { FiniteMdp, PolicyMatrix } from '../definitions/finite-mdp.js';

/**
 * What `reckon check` warns about in a finite environment, though the files are valid: a
 * start state that is terminal (those episodes end at once with return 0), a policy that keeps
 * the agent in place wherever it goes (every action it gives probability to leads back to the
 * same state), and no terminal reachable from the start at all, so every episode runs to the
 * horizon and the value depends on where it is cut.
 */
export function finiteWarnings(mdp: FiniteMdp, policy: PolicyMatrix | null, start: number | null): string[] {
  const warnings: string[] = [];
  const { stateCount, actionCount, terminal, outcomeStart, outcomeNext, outcomeProbability, stateNames } = mdp;
  const starts = start !== null ? [start] : Array.from({ length: stateCount }, (_, s) => s).filter((s) => mdp.startProbability[s] > 0);
  const terminalStarts = starts.filter((s) => terminal[s] === 1);
  if (start !== null && terminalStarts.length > 0) {
    warnings.push(`--start "${stateNames[start]}" is a terminal state: every episode ends at once with return 0`);
  } else if (terminalStarts.length > 0) {
    warnings.push(`start state${terminalStarts.length > 1 ? 's' : ''} ${names(terminalStarts, stateNames)} ${terminalStarts.length > 1 ? 'are' : 'is'} terminal: episodes that start there end at once with return 0`);
  }
  const acts = (s: number, a: number) => (policy ? policy.probability[s * actionCount + a] > 0 : true);

  // States reachable from the start under the policy (or under any action without one).
  const reached = new Uint8Array(stateCount);
  const stack = [...starts];
  for (const s of starts) reached[s] = 1;
  while (stack.length > 0) {
    const s = stack.pop()!;
    if (terminal[s] === 1) continue;
    for (let a = 0; a < actionCount; a++) {
      if (!acts(s, a)) continue;
      for (let k = outcomeStart[s * actionCount + a]; k < outcomeStart[s * actionCount + a + 1]; k++) {
        const next = outcomeNext[k];
        if (outcomeProbability[k] > 0 && reached[next] === 0) {
          reached[next] = 1;
          stack.push(next);
        }
      }
    }
  }

  if (policy) {
    const stuck: number[] = [];
    for (let s = 0; s < stateCount; s++) {
      if (terminal[s] === 1 || reached[s] === 0) continue;
      let movesAway = false;
      for (let a = 0; a < actionCount && !movesAway; a++) {
        if (!acts(s, a)) continue;
        for (let k = outcomeStart[s * actionCount + a]; k < outcomeStart[s * actionCount + a + 1]; k++) {
          if (outcomeProbability[k] > 0 && outcomeNext[k] !== s) movesAway = true;
        }
      }
      if (!movesAway) stuck.push(s);
    }
    if (stuck.length > 0) {
      warnings.push(`in state${stuck.length > 1 ? 's' : ''} ${names(stuck, stateNames)} the policy gives probability only to actions that lead back to the same state: an episode that gets there stays until the horizon`);
    }
  }
  const anyTerminal = Array.from(reached).some((r, s) => r === 1 && terminal[s] === 1);
  const anyNonTerminalStart = starts.some((s) => terminal[s] === 0);
  if (!anyTerminal && anyNonTerminalStart) {
    warnings.push(
      `no terminal state can be reached from the start${policy ? ' under this policy' : ' by any action'}: every episode runs to the horizon (${mdp.horizon} steps), so the value depends on where episodes are cut`,
    );
  }
  return warnings;
}

function names(states: readonly number[], stateNames: readonly string[], max = 6): string {
  const shown = states.slice(0, max).map((s) => `"${stateNames[s]}"`).join(', ');
  return states.length > max ? `${shown} and ${states.length - max} more` : shown;
}
