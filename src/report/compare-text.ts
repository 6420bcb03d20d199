import { exactBeside } from './exact-beside.js';
import type { ComparisonResult } from '../evaluate/compare.js';
import { columns, count, decimalsFor, fixed, sig, timeSplit } from './format.js';
import { NOISE_WORDS } from './noise-words.js';
import { groupText } from './group-text.js';

function pText(p: number): string {
  return p < 1e-4 ? '< 0.0001' : p.toFixed(4);
}

/** The plain-text report of a comparison: who is ahead, by how much, how sure, and what pairing bought. */
export function compareText(result: ComparisonResult, labels: { env: string; policies: readonly string[] }): string {
  const { comparison } = result;
  const level = `${+(result.request.level * 100).toFixed(4)}%`;
  const lines: string[] = [];
  lines.push(`Comparing ${labels.policies.length} policies in ${labels.env}${result.request.start ? ` from state ${result.request.start}` : ''}`);
  lines.push(`  ${count(result.episodes)} episodes each, the same seed (${result.request.seed}) and environment noise for every policy (common random numbers), ${NOISE_WORDS[result.request.noise]}`);
  if (result.target) {
    lines.push(
      result.target.reached
        ? `  target ±${result.target.error} on every difference reached after ${count(result.episodes)} episodes (anytime-valid intervals)`
        : `  target ±${result.target.error} NOT reached within ${count(result.target.maxEpisodes)} episodes`,
    );
  }
  lines.push('');
  const widest = Math.max(...result.estimates.map((e) => e.ci.halfWidth));
  const d = decimalsFor(Math.min(...result.differenceIntervals.map((i) => i.halfWidth), widest));
  const policyRows = [['rank', 'policy', 'expected return', `${level} interval`, 'mean length']];
  const order = [...comparison.policies].sort((a, b) => a.rank - b.rank || a.policy - b.policy);
  for (const standing of order) {
    const e = result.estimates[standing.policy];
    policyRows.push([
      String(standing.rank),
      `[${standing.policy}] ${labels.policies[standing.policy]}`,
      fixed(e.mean, d),
      `${fixed(e.ci.low, d)} … ${fixed(e.ci.high, d)}`,
      sig(e.meanLength, 3),
    ]);
  }
  lines.push(...columns(policyRows));
  const exact = result.estimates.map((e) => exactBeside(e));
  if (exact.some((x) => x !== null)) {
    lines.push('', '  Exact values (reckon exact) against each interval:');
    exact.forEach((x, p) => {
      if (x) lines.push(`    [${p}] ${fixed(x.value, d + 1)}  ${x.inside ? 'inside' : 'OUTSIDE'} its interval`);
    });
  }
  if (comparison.policies.some((p) => p.interquartileMean)) {
    lines.push('', '  Interquartile mean (middle 50% of returns) with a stratified bootstrap interval:');
    for (const p of comparison.policies) {
      const iqm = p.interquartileMean!;
      lines.push(`    [${p.policy}] ${fixed(iqm.estimate, d)}  (${fixed(iqm.interval.low, d)} … ${fixed(iqm.interval.high, d)})`);
    }
  }
  lines.push(...groupText(result, labels, d));
  // With groups, the many member-by-member pairs would bury the report: they stay in --json.
  const listPairs = !result.groups || comparison.pairs.length <= 6;
  if (listPairs) lines.push('', `  Paired differences (first − second), ${level} ${result.differenceIntervals[0]?.method ?? ''} intervals:`);
  else lines.push('', `  ${comparison.pairs.length} paired differences between single policies are in --json (differences).`);
  const multiple = comparison.pairs.length > 1;
  comparison.pairs.forEach((pair, q) => {
    if (!listPairs) return;
    const interval = result.differenceIntervals[q];
    const sign = pair.meanDifference >= 0 ? '+' : '';
    const pPart = multiple ? `p ${pText(pair.pValue)}, Holm-adjusted ${pText(pair.adjustedPValue)}` : `p ${pText(pair.pValue)}`;
    lines.push(
      `    [${pair.first}] − [${pair.second}]   ${sign}${fixed(pair.meanDifference, d)}  (${fixed(interval.low, d)} … ${fixed(interval.high, d)}), ${pPart}`,
    );
    const poi = pair.probabilityOfImprovement;
    lines.push(
      `        P([${pair.first}] returns more than [${pair.second}]) ${poi.estimate.toFixed(3)} (${poi.interval.low.toFixed(3)} … ${poi.interval.high.toFixed(3)}); ` +
        `correlation ${pair.correlation.toFixed(3)}: ` +
        (!Number.isFinite(pair.varianceReduction)
          ? 'the two returned exactly the same in every episode, so their difference is exactly 0 (are they the same policy?)'
          : pair.varianceReduction >= 1.05
          ? `pairing made this ${sig(pair.varianceReduction, 3)}× cheaper than independent runs`
          : `pairing bought little here (${sig(pair.varianceReduction, 3)}×: the policies' returns hardly move together)`),
    );
  });
  if (result.riskDifferences) {
    const percent = `${+(result.riskDifferences[0].tail * 100).toFixed(2)}%`;
    lines.push('', `  Risk differences (first − second), ${level} paired bootstrap intervals, approximate:`);
    comparison.pairs.forEach((pair, q) => {
      const r = result.riskDifferences![q];
      const parts = [`mean of the worst ${percent} ${fixed(r.tailMean.estimate, d)} (${fixed(r.tailMean.low, d)} … ${fixed(r.tailMean.high, d)})`];
      for (const e of r.events) parts.push(`P(${e.event}) ${e.estimate.toFixed(4)} (${e.low.toFixed(4)} … ${e.high.toFixed(4)})`);
      lines.push(`    [${pair.first}] − [${pair.second}]   ${parts.join('; ')}`);
    });
    result.estimates.forEach((e, p) => {
      if (e.risk) lines.push(`    [${p}] worst ${percent} mean ${fixed(e.risk.tail.estimate, d)}${e.risk.tail.dkw ? ` (DKW ${fixed(e.risk.tail.dkw.low, d)} … ${fixed(e.risk.tail.dkw.high, d)})` : ''}`);
    });
  }
  if (result.warnings.length > 0) lines.push('', ...result.warnings.map((w) => `  warning: ${w}`));
  if (multiple && listPairs) lines.push('', `  With ${comparison.pairs.length} pairs, p-values are Holm-adjusted (Holm 1979) to keep the chance of any false difference at ${(100 - result.request.level * 100).toFixed(0)}%.`);
  lines.push('', `  time ${timeSplit(result.samplingSeconds, result.analysisSeconds)} on ${result.request.workers} worker${result.request.workers === 1 ? '' : 's'}`);
  if (result.interrupted) lines.push(`  Stopped early after ${count(result.episodes)} episodes; the figures above use those.`);
  return lines.join('\n') + '\n';
}
