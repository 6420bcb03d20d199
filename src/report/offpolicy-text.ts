/**
 * The `offpolicy` report: estimators side by side, the bounds, then the diagnostics. Drawn
 * from the JSON object, which is also what the store keeps, so `runs show` prints the same.
 */
import { columns, count, decimalsFor, fixed, sig } from './format.js';
import type { OffPolicyJson } from './offpolicy-json.js';

type Pair = { low: number | null; high: number | null } | null;

export function offPolicyText(json: OffPolicyJson): string {
  const d = json.diagnostics;
  const percent = `${Math.round(json.level * 1000) / 10}%`;
  const halfWidths = json.estimates.map((e) => (e.intervals.bootstrap?.low != null && e.intervals.bootstrap.high != null ? (e.intervals.bootstrap.high - e.intervals.bootstrap.low) / 2 : Number.NaN));
  const spread = Math.max(...halfWidths.filter((h) => Number.isFinite(h) && h > 0), 1e-9);
  const places = Math.min(6, decimalsFor(spread) + 1);
  const value = (x: number | null | undefined) => (x !== null && x !== undefined && Number.isFinite(x) ? fixed(x, places) : 'undefined');
  const range = (p: Pair) => (p && p.low !== null && p.high !== null ? `${value(p.low)} … ${value(p.high)}` : '–');
  const lines: string[] = [];
  lines.push(`  target policy    ${json.policy}`);
  lines.push(`  log              ${json.log.path}: ${count(json.log.episodes)} episodes, ${count(json.log.steps)} steps, discount ${json.discount}${json.horizon !== null ? `, horizon ${json.horizon}` : ''}`);
  lines.push('');
  const rows = [['estimator', '', 'estimate', `${percent} BCa bootstrap`, 'percentile bootstrap', 't (means only)']];
  for (const e of json.estimates) rows.push([e.name, e.title, value(e.estimate), range(e.intervals.bootstrap), range(e.intervals.bootstrap_percentile), range(e.intervals.t)]);
  lines.push(...columns(rows));
  const fewer = json.estimates.filter((e) => e.resamples < json.resamples);
  const fewerNote = fewer.length > 0 ? `; ${fewer.map((e) => e.name).join(' and ')} ${count(fewer[0].resamples)}, each a pass over every step` : '';
  lines.push(`  Bootstrap intervals resample whole episodes (${count(json.resamples)} times${fewerNote}) and are approximate, as is t.`);
  if (json.estimates.some((e) => e.name === 'dr' || e.name === 'wdr')) {
    lines.push(`  DR and WDR subtract a tabular model fitted by ${json.folds}-fold cross-fitting (each fold's model from the other folds).`);
  }
  lines.push('  Disagreement between the estimators is itself a warning sign.');
  lines.push('');
  lines.push(`  Bounds valid at any number of episodes (${percent}; the lower bounds one-sided):`);
  for (const b of json.bounds) {
    const name = b.method === 'betting-lower' ? 'betting, on the weighted returns' : b.method === 'high-confidence-lower' ? 'Thomas et al. (2015), truncated weights' : 'betting, two-sided (largest weight known)';
    const held = 'threshold' in b && b.threshold !== undefined ? `  (threshold ${sig(b.threshold ?? Number.NaN)} chosen on ${b.held_out} held-out episodes, not used in the bound)` : '';
    const detail = b.note ? `–  (${b.note})` : b.high !== null ? range({ low: b.low, high: b.high }) : `${value(b.low)}${held}`;
    lines.push(`    ${name.padEnd(42)} ${detail}`);
  }
  lines.push('');
  lines.push('  Diagnostics');
  let smallest = 0;
  d.step_ess.forEach((e, t) => {
    if (e < d.step_ess[smallest]) smallest = t;
  });
  const share = d.max_weight_share;
  const interval = d.mean_weight_interval;
  lines.push(
    ...columns(
      [
        ['effective sample size (Kish)', `${sig(d.ess)} of ${count(json.log.episodes)} episodes (${sig(100 * d.ess_fraction, 3)}%)`],
        ['  per step', d.step_ess.length > 0 ? `${sig(d.step_ess[0])} at t = 0, smallest ${sig(d.step_ess[smallest])} at t = ${smallest}` : '–'],
        ['largest weight', `${sig(d.max_weight)}${share !== null ? ` (${sig(100 * share, 3)}% of all weight)` : ''}; ${sig(100 * d.zero_weight_fraction, 3)}% of episodes weigh 0`],
        ['mean weight', `${sig(d.mean_weight)} (${percent}: ${interval ? `${sig(interval.low ?? Number.NaN)} … ${sig(interval.high ?? Number.NaN)}` : '–'}); 1 when the logged probabilities are right`],
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
