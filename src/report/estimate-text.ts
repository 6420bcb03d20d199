import type { EstimateResult } from '../evaluate/estimate.js';
import { riskText } from './risk-report.js';
import { columns, count, decimalsFor, duration, fixed, meanWithInterval, rate, sig, timeSplit } from './format.js';
import { NOISE_WORDS } from './noise-words.js';
import { exactBeside } from './exact-beside.js';

const METHOD_NAMES: Record<string, string> = {
  t: 'Student t',
  normal: 'normal (CLT)',
  bootstrap: 'bootstrap BCa',
  'bootstrap-percentile': 'bootstrap percentile',
  hoeffding: 'Hoeffding',
  bernstein: 'empirical Bernstein',
  betting: 'anytime-valid betting',
  'empirical-bernstein': 'anytime-valid empirical-Bernstein',
  'normal-mixture': 'anytime-valid normal-mixture',
  'normal-mixture-asymptotic': 'normal-mixture (plug-in σ, asymptotic)',
  'chow-robbins': 'Chow–Robbins fixed-width (asymptotic)',
  'chow-robbins-asymptotic': 'Chow–Robbins fixed-width (asymptotic)',
};

/** The plain-text report of an estimate: the estimate first, then how sure, then what more would cost. */
export function estimateText(result: EstimateResult, labels: { env: string; policy: string }): string {
  const facts = result.facts;
  const ci = result.ci;
  const d = decimalsFor(ci.halfWidth);
  const level = `${+(ci.level * 100).toFixed(4)}%`;
  const lines: string[] = [];
  lines.push(`Policy ${labels.policy} in ${labels.env}${result.start ? `, every episode from state ${result.start}` : ''}`);
  lines.push('');
  lines.push(`  expected return  ${meanWithInterval(result.mean, ci.low, ci.high, d)}   (${level} ${METHOD_NAMES[ci.method] ?? ci.method} interval ${fixed(ci.low, d)} … ${fixed(ci.high, d)})`);
  if (result.targetEvent) {
    const e = result.targetEvent;
    const t = result.target!;
    const pd = decimalsFor(e.interval.halfWidth);
    lines.push(`  P(${e.event})${' '.repeat(Math.max(1, 15 - e.event.length))}${fixed(e.estimate, pd)} (${fixed(e.interval.low, pd)} … ${fixed(e.interval.high, pd)})   (${level} anytime-valid betting interval; ${count(e.count)} of ${count(result.episodes)} episodes)`);
    lines.push(
      t.reached
        ? `  target           ±${fixed(t.error, decimalsFor(t.error))} on P(${e.event}) reached after ${count(result.episodes)} episodes (the interval stays valid although the run stopped on the data)`
        : `  target           ±${fixed(t.error, decimalsFor(t.error))} on P(${e.event}) NOT reached within ${count(t.maxEpisodes)} episodes; reached ±${fixed(e.interval.halfWidth, pd)}`,
    );
  } else if (result.target) {
    const t = result.target;
    lines.push(
      t.reached
        ? `  target           ±${fixed(t.error, decimalsFor(t.error))} reached after ${count(result.episodes)} episodes ${
            ci.anytimeValid
              ? '(the interval stays valid although the run stopped on the data)'
              : '(an asymptotic rule: its coverage at a stop chosen by the data holds only in the limit of small targets)'
          }`
        : `  target           ±${fixed(t.error, decimalsFor(t.error))} NOT reached within ${count(t.maxEpisodes)} episodes; reached ±${fixed(ci.halfWidth, d)}`,
    );
  }
  const exact = exactBeside(result);
  if (exact) {
    lines.push(
      `  exact value      ${fixed(exact.value, d + 1)} (reckon exact): ${exact.inside ? 'inside' : 'OUTSIDE'} the interval${exact.inside ? '' : `, which a ${level} interval misses ${sig(100 - ci.level * 100, 2)}% of the time`}`,
    );
  }
  for (const warning of result.warnings) lines.push(`  warning          ${warning}`);
  lines.push(`  spread           std ${sig(result.std)}, standard error ${sig(result.stderr)}, returns from ${sig(result.min)} to ${sig(result.max)}`);
  lines.push(`  episodes         ${count(result.episodes)} with seed ${result.seed}, ${NOISE_WORDS[result.noise]}; mean length ${sig(result.meanLength, 3)} steps, longest ${count(result.longestEpisode)}`);
  lines.push(`  horizon          ${count(facts.horizon)} steps, discount ${facts.discount}`);
  if (facts.truncationBound !== null) {
    lines.push(
      facts.horizonDerived
        ? `                   (derived: cutting episodes there moves the value by at most ${sig(facts.truncationBound, 2)})`
        : `                   (if the task has no time limit there, the untruncated value may differ by up to ${sig(facts.truncationBound, 2)})`,
    );
  }
  if (result.episodesAtHorizon > 0) {
    lines.push(`                   ${count(result.episodesAtHorizon)} episodes ran the full horizon without ending`);
  }
  if (result.bounds) {
    const source = result.boundsSource === 'user' ? 'from --bounds' : facts.kind === 'finite' ? 'exact, for this policy' : "from the environment's reward range";
    lines.push(`  return bounds    ${sig(result.bounds[0])} … ${sig(result.bounds[1])} (${source})`);
  }
  const sampling = result.samplingSeconds;
  const throughput = sampling > 0 ? `${rate(result.steps / sampling)} steps/s, ${rate(result.episodes / sampling)} episodes/s` : '';
  lines.push(`  time             ${timeSplit(sampling, result.analysisSeconds)} on ${result.workers} worker${result.workers === 1 ? '' : 's'}${throughput ? `, ${throughput}` : ''}`);
  if (result.interrupted) {
    lines.push('', `  Stopped early: ${count(result.episodes)} of ${count(result.requestedEpisodes)} episodes ran; the figures above use those.`);
  }
  if (result.projection.length > 0) {
    lines.push('', '  To narrow the interval (at this run\'s spread and speed; time counts sampling and analysis):');
    const rows = [['± half-width', 'episodes needed', 'more than now', 'time']];
    for (const row of result.projection) {
      rows.push([fixed(row.half_width, decimalsFor(row.half_width)), count(row.episodes_needed), count(row.more_episodes), duration(row.seconds)]);
    }
    lines.push(...columns(rows, '    '));
  }
  if (result.risk) lines.push(...riskText(result.risk, Math.max(result.std / 10, 1e-12)));
  return lines.join('\n') + '\n';
}
