/** The `offpolicy` report: estimators side by side, the bounds, then the diagnostics. */
import { ESTIMATOR_TITLES } from '../offpolicy/evaluate-log.js';
import type { OffPolicyRun } from '../offpolicy/run-offpolicy.js';
import { columns, count, decimalsFor, fixed, sig } from './format.js';
import type { OffPolicyLabels } from './offpolicy-json.js';

export function offPolicyText(run: Pick<OffPolicyRun, 'log' | 'discount' | 'horizon' | 'returnBounds' | 'result'>, labels: OffPolicyLabels): string {
  const { result } = run;
  const d = result.diagnostics;
  const percent = `${Math.round(result.level * 1000) / 10}%`;
  const spread = Math.max(...result.estimators.map((e) => Math.abs(e.intervals.bootstrap[1] - e.intervals.bootstrap[0]) / 2).filter(Number.isFinite), 1e-9);
  const places = Math.min(6, decimalsFor(spread) + 1);
  const value = (x: number) => (Number.isFinite(x) ? fixed(x, places) : 'undefined');
  const range = (p: readonly [number, number] | null) => (p && Number.isFinite(p[0]) ? `${value(p[0])} … ${value(p[1])}` : '–');
  const lines: string[] = [];
  lines.push(`  target policy    ${labels.policy}`);
  lines.push(`  log              ${labels.log}: ${count(result.episodes)} episodes, ${count(result.steps)} steps, discount ${run.discount}${run.horizon !== null ? `, horizon ${run.horizon}` : ''}`);
  lines.push('');
  const rows = [['estimator', '', 'estimate', `${percent} BCa bootstrap`, 'percentile bootstrap', 't (means only)']];
  for (const e of result.estimators) {
    rows.push([e.name, ESTIMATOR_TITLES[e.name], value(e.estimate), range(e.intervals.bootstrap), range(e.intervals.bootstrapPercentile), range(e.intervals.t)]);
  }
  lines.push(...columns(rows));
  const fewer = result.estimators.filter((e) => e.resamples < result.resamples);
  const fewerNote = fewer.length > 0 ? `; ${fewer.map((e) => e.name).join(' and ')} ${count(fewer[0].resamples)}, each a pass over every step` : '';
  lines.push(`  Bootstrap intervals resample whole episodes (${count(result.resamples)} times${fewerNote}) and are approximate, as is t.`);
  if (result.estimators.some((e) => e.name === 'dr' || e.name === 'wdr')) {
    lines.push(`  DR and WDR subtract a tabular model fitted by ${result.folds}-fold cross-fitting (each fold's model from the other folds).`);
  }
  lines.push('  Disagreement between the estimators is itself a warning sign.');
  lines.push('');
  lines.push(`  Lower bounds, valid at any number of episodes (one-sided, ${percent}):`);
  for (const b of result.bounds) {
    const name = b.method === 'betting-lower' ? 'betting, on the weighted returns' : b.method === 'high-confidence-lower' ? 'Thomas et al. (2015), truncated weights' : 'betting, two-sided';
    const detail = b.note ? `–  (${b.note})` : b.high !== null ? range([b.low, b.high]) : `${value(b.low)}${b.threshold !== undefined ? `  (threshold ${sig(b.threshold)} chosen on ${b.heldOut} held-out episodes, not used in the bound)` : ''}`;
    lines.push(`    ${name.padEnd(40)} ${detail}`);
  }
  lines.push('');
  lines.push('  Diagnostics');
  let smallest = 0;
  d.stepEss.forEach((e, t) => {
    if (e < d.stepEss[smallest]) smallest = t;
  });
  lines.push(
    ...columns(
      [
        ['effective sample size (Kish)', `${sig(d.ess)} of ${count(result.episodes)} episodes (${sig(100 * d.essFraction, 3)}%)`],
        ['  per step', d.stepEss.length > 0 ? `${sig(d.stepEss[0])} at t = 0, smallest ${sig(d.stepEss[smallest])} at t = ${smallest}` : '–'],
        ['largest weight', `${sig(d.maxWeight)}${Number.isFinite(d.maxWeightShare) ? ` (${sig(100 * d.maxWeightShare, 3)}% of all weight)` : ''}; ${sig(100 * d.zeroWeightFraction, 3)}% of episodes weigh 0`],
        ['mean weight', `${sig(d.meanWeight)} (${percent}: ${sig(d.meanWeightInterval[0])} … ${sig(d.meanWeightInterval[1])}); 1 when the logged probabilities are right`],
      ],
      '    ',
    ),
  );
  for (const w of d.warnings) lines.push(`  Warning: ${w}`);
  if (d.verdict) lines.push('', `  ${d.verdict}`);
  lines.push('');
  lines.push('  These are statistical estimates about the logged system under the stated assumptions (the logged');
  lines.push('  probabilities are the behaviour\'s, given the logged state); they are not safety evidence.');
  return `${lines.join('\n')}\n`;
}
