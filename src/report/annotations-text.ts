import type { RunRecord } from '../store/runs.js';

/** A run's labels and notes as `runs show` prints them under its header (nothing when it has none). */
export function annotationsText(run: Pick<RunRecord, 'labels' | 'notes'>): string {
  const lines: string[] = [];
  const labels = Object.entries(run.labels);
  if (labels.length > 0) lines.push(`  labels: ${labels.map(([k, v]) => `${k}=${v}`).join(', ')}`);
  for (const note of run.notes) lines.push(`  note (${note.addedAt.replace('T', ' ').slice(0, 16)}): ${note.text.replace(/\s*\n\s*/g, ' / ')}`);
  return lines.length > 0 ? `${lines.join('\n')}\n` : '';
}
