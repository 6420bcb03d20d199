import type { RiskFigures } from '../evaluate/risk.js';
import { columns, count, decimalsFor, fixed, sig } from './format.js';

/** The `risk` object of every run JSON: snake_case keys, a contract like the rest. */
export function riskJson(risk: RiskFigures | null) {
  if (!risk) return null;
  return {
    level: risk.level,
    dkw_epsilon: risk.dkwEpsilon,
    quantiles: risk.quantiles.map((q) => ({
      p: q.p,
      estimate: q.estimate,
      low: finiteOrNull(q.low),
      high: finiteOrNull(q.high),
      low_rank: q.lowRank,
      high_rank: q.highRank,
      coverage: q.coverage,
    })),
    tail_mean: {
      tail: risk.tail.tail,
      estimate: risk.tail.estimate,
      dkw: risk.tail.dkw,
      bootstrap: risk.tail.bootstrap ? { low: risk.tail.bootstrap.low, high: risk.tail.bootstrap.high, resamples: risk.tail.bootstrap.resamples, approximate: true } : null,
    },
    events: risk.events.map((e) => ({
      event: e.event,
      count: e.count,
      episodes: e.episodes,
      estimate: e.estimate,
      clopper_pearson: { low: e.clopperPearson.low, high: e.clopperPearson.high },
      wilson: { low: e.wilson.low, high: e.wilson.high },
      zero_events: e.zeroEvents ? { upper: e.zeroEvents.upper, episodes_for: e.zeroEvents.episodesFor } : null,
    })),
    warnings: risk.warnings,
  };
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

const percent = (x: number) => `${+(x * 100).toFixed(2)}%`;
const probability = (x: number) => (x === 0 ? '0' : x < 1e-3 ? x.toExponential(3) : x.toFixed(4));
const bound = (x: number, d: number) => (Number.isFinite(x) ? fixed(x, d) : x < 0 ? '−∞' : '∞');

/** The risk section of a text report. */
export function riskText(risk: RiskFigures, scale: number): string[] {
  const d = decimalsFor(scale);
  const level = percent(risk.level);
  const lines = ['', `  Risk (${level} intervals; returns sorted from the worst):`];
  const rows = [['quantile', 'return', `interval (order statistics)`, 'attained coverage']];
  for (const q of risk.quantiles) {
    rows.push([percent(q.p), fixed(q.estimate, d), `${bound(q.low, d)} … ${bound(q.high, d)}`, `≥ ${(q.coverage * 100).toFixed(2)}%`]);
  }
  lines.push(...columns(rows, '    '));
  const t = risk.tail;
  lines.push('');
  lines.push(`    mean of the worst ${percent(t.tail)}  ${fixed(t.estimate, d)}`);
  lines.push(t.dkw ? `      distribution-free (DKW band)  ${fixed(t.dkw.low, d)} … ${fixed(t.dkw.high, d)}` : '      distribution-free: needs return bounds (--bounds LOW,HIGH)');
  if (t.bootstrap) lines.push(`      bootstrap (approximate)       ${fixed(t.bootstrap.low, d)} … ${fixed(t.bootstrap.high, d)}`);
  for (const e of risk.events) {
    lines.push('');
    lines.push(`    P(${e.event})  ${probability(e.estimate)}  (${count(e.count)} of ${count(e.episodes)} episodes)`);
    lines.push(`      Clopper–Pearson ${probability(e.clopperPearson.low)} … ${probability(e.clopperPearson.high)}; Wilson ${probability(e.wilson.low)} … ${probability(e.wilson.high)}`);
    if (e.zeroEvents) {
      lines.push(`      never happened: p ≤ ${sig(e.zeroEvents.upper, 3)} (one-sided ${level}, Clopper–Pearson)`);
      lines.push(`      ${e.zeroEvents.episodesFor.map((x) => `episodes for p ≤ ${x.bound} with zero events: ${count(x.episodes)}`).join('; ')}`);
    }
  }
  lines.push('', `    The empirical CDF lies within ±${sig(risk.dkwEpsilon, 3)} of the true one everywhere, at ${level} (DKW band; 'reckon runs plot ID --kind cdf').`);
  for (const w of risk.warnings) lines.push(`    warning: ${w}`);
  return lines;
}
