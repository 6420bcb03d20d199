import type { ComparisonResult } from '../evaluate/compare.js';
import { columns, count, fixed, sig } from './format.js';
import { groupAdviceText } from './group-advice.js';

function pText(p: number): string {
  return p < 1e-4 ? '< 0.0001' : p.toFixed(4);
}

/** The two-level part of a comparison's text report: each group over its seeds, then groups against each other. */
export function groupText(result: ComparisonResult, labels: { policies: readonly string[] }, d: number): string[] {
  const groups = result.groups;
  if (!groups) return [];
  const level = `${+(result.request.level * 100).toFixed(4)}%`;
  const lines: string[] = [];
  for (const g of groups.groups) {
    const c = g.components;
    lines.push('', `  Group ${g.name}: ${c.members} members (one a training seed), ${count(c.episodes[0])} episodes each`);
    const rows = [['member', 'expected return', `${level} interval (episodes only)`]];
    g.members.forEach((p, i) => {
      const e = result.estimates[p];
      rows.push([`[${p}] ${labels.policies[p]}`, fixed(c.memberMeans[i], d), `${fixed(e.ci.low, d)} … ${fixed(e.ci.high, d)}`]);
    });
    lines.push(...columns(rows, '    '));
    const df = g.interval.degreesOfFreedom ?? 0;
    lines.push(`    group mean            ${fixed(g.mean, d)}  (${fixed(g.interval.low, d)} … ${fixed(g.interval.high, d)}), ${level} t interval over seeds, ${sig(df, 3)} df`);
    if (g.seedBootstrap) lines.push(`    seed-level bootstrap  (${fixed(g.seedBootstrap.low, d)} … ${fixed(g.seedBootstrap.high, d)})`);
    lines.push(`    IQM of members        ${fixed(g.interquartileMean.estimate, d)}  (${fixed(g.interquartileMean.interval.low, d)} … ${fixed(g.interquartileMean.interval.high, d)}), bootstrap over members`);
    lines.push(
      `    naive pooled          (${fixed(g.naive.low, d)} … ${fixed(g.naive.high, d)}): wrong, it treats all ${count(c.episodes.reduce((a, b) => a + b, 0))} episodes as independent (design effect ${sig(c.designEffect, 3)})`,
    );
    lines.push(
      `    variance              between seeds σ_b ${sig(Math.sqrt(c.betweenVariance), 3)}, within a policy σ_w ${sig(Math.sqrt(c.withinVariance), 3)}; intraclass correlation ${c.intraclassCorrelation.toFixed(3)}`,
    );
    const seedPart = Math.round((1 - g.episodeShare) * 100);
    lines.push(`    uncertainty from      seeds ${seedPart}%  ${bar(1 - g.episodeShare)}  episodes ${100 - seedPart}%`);
    lines.push(`    ${groupAdviceText(g)}`);
  }
  if (groups.pairs.length > 0) {
    const multiple = groups.pairs.length > 1;
    lines.push('', `  Between groups (difference of group means, ${level} Welch interval over seeds; seeds are not paired):`);
    for (const p of groups.pairs) {
      const a = groups.groups[p.first].name;
      const b = groups.groups[p.second].name;
      const sign = p.mean >= 0 ? '+' : '';
      const pPart = multiple ? `p ${pText(p.pValue)}, Holm-adjusted ${pText(p.adjustedPValue)}` : `p ${pText(p.pValue)}`;
      lines.push(`    ${a} − ${b}   ${sign}${fixed(p.mean, d)}  (${fixed(p.interval.low, d)} … ${fixed(p.interval.high, d)}), ${pPart}`);
      const poi = p.probabilityOfImprovement;
      lines.push(`        P(a ${a} member is worth more than a ${b} member) ${poi.estimate.toFixed(3)} (${poi.interval.low.toFixed(3)} … ${poi.interval.high.toFixed(3)})`);
    }
  }
  return lines;
}

/** A 20-character bar: the seeds' share filled, the episodes' share open. */
function bar(seedShare: number): string {
  const filled = Math.max(0, Math.min(20, Math.round(seedShare * 20)));
  return `${'█'.repeat(filled)}${'░'.repeat(20 - filled)}`;
}
