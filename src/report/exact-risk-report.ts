import type { FiniteMdp } from '../definitions/finite-mdp.js';
import type { ExactRisk } from '../exact/exact-risk.js';
import { sig } from './format.js';

/** Terminal states a policy reaches, with their probabilities, most likely first. */
function endingsOf(mdp: FiniteMdp, risk: ExactRisk) {
  const rows: { state: string; cell: string | null; probability: number }[] = [];
  risk.endings.terminalProbability.forEach((p, s) => {
    if (p > 0) rows.push({ state: mdp.stateNames[s], cell: cellCharOf(mdp, s), probability: p });
  });
  return rows.sort((a, b) => b.probability - a.probability);
}

function cellCharOf(mdp: FiniteMdp, state: number): string | null {
  const grid = mdp.grid;
  if (!grid) return null;
  const cell = grid.cellState.indexOf(state);
  return cell >= 0 ? grid.cellChar[cell] : null;
}

export function exactRiskJson(mdp: FiniteMdp, risk: ExactRisk) {
  return {
    terminal_probabilities: endingsOf(mdp, risk),
    truncated_probability: risk.endings.truncated,
    return_distribution: risk.distribution ? { atoms: risk.distribution.returns.length } : null,
    return_distribution_reason: risk.reason,
    quantiles: risk.quantiles,
    tail_mean: risk.tailMean,
    events: risk.events,
  };
}

export function exactRiskText(mdp: FiniteMdp, risk: ExactRisk): string {
  const lines = ['', '  Risk, exactly:'];
  for (const row of endingsOf(mdp, risk)) lines.push(`    ends in ${row.state}${row.cell ? ` ('${row.cell}')` : ''}  ${sig(row.probability, 6)}`);
  lines.push(`    runs the whole horizon without ending  ${sig(risk.endings.truncated, 6)}`);
  if (risk.distribution) {
    lines.push(`    return distribution: ${risk.distribution.returns.length.toLocaleString('en')} distinct returns`);
    for (const q of risk.quantiles ?? []) lines.push(`    ${+(q.p * 100).toFixed(2)}% quantile  ${sig(q.value, 6)}`);
    if (risk.tailMean) lines.push(`    mean of the worst ${+(risk.tailMean.tail * 100).toFixed(2)}%  ${sig(risk.tailMean.value, 6)}`);
  } else {
    lines.push(`    return distribution not computed: ${risk.reason}`);
  }
  for (const e of risk.events) lines.push(`    P(${e.event})  ${e.probability === null ? 'unknown (needs the return distribution)' : sig(e.probability, 6)}`);
  return lines.join('\n') + '\n';
}
