import { statSync } from 'node:fs';
import { createInterface } from 'node:readline/promises';
import { InputError } from '../../errors.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { deleteRun, getRun, listMembers, listRuns, loadEpisodes, refuseIfLive, type RunRecord } from '../../store/runs.js';
import { runsListText } from '../../report/runs-text.js';
import { parseCommandArgs } from '../args.js';
import { writeOutputFile } from '../output-file.js';
import { FILTER_OPTIONS, filterFrom } from '../run-filter.js';
import { comparisonsDependingOn } from '../../evaluate/runs-compare-store.js';

/** Asks on the terminal; false unless the answer is yes. */
async function confirm(question: string): Promise<boolean> {
  const prompt = createInterface({ input: process.stdin, output: process.stderr });
  try {
    const answer = await prompt.question(question);
    return /^\s*y(es)?\s*$/i.test(answer);
  } finally {
    prompt.close();
  }
}

/**
 * `runs delete ID… | FILTERS [--dry-run] [--yes]`. Runs named by id go at once, as they always
 * have (a running one is refused). Runs chosen by filters are listed and, unless --yes, confirmed
 * on the terminal (refused when there is none to ask); running runs are never deleted, only named.
 */
export async function remove(args: string[], help: string): Promise<number> {
  const { values, positionals } = parseCommandArgs(
    'runs',
    args,
    { store: { type: 'string' }, json: { type: 'boolean' }, 'dry-run': { type: 'boolean' }, yes: { type: 'boolean' }, all: { type: 'boolean' }, ...FILTER_OPTIONS },
    true,
  );
  if (values.help) {
    process.stdout.write(help);
    return 0;
  }
  const storeLabel = values.store ?? defaultStorePath();
  const db = openStore(storeLabel, { readonly: true });
  try {
    const { filter, any } = filterFrom(db, values);
    if (positionals.length === 0 && !any) {
      throw new InputError('runs delete', "needs run ids or filters (e.g. --label draft=yes --until 30d); see what would go with --dry-run first");
    }
    if (positionals.length > 0 && any) throw new InputError('runs delete', 'takes run ids or filters, not both: delete the named runs, or the runs the filters find');
    let targets: RunRecord[];
    let live: RunRecord[] = [];
    let members: RunRecord[] = [];
    if (positionals.length > 0) {
      targets = positionals.map((id) => getRun(db, id, storeLabel));
      for (const run of targets) refuseIfLive(run, 'delete it');
    } else {
      const found = listRuns(db, { ...filter, limit: Number.MAX_SAFE_INTEGER, parentId: values.all ? undefined : null });
      live = found.filter((r) => r.status === 'running');
      // A comparison's member run goes with its comparison, never alone (that would leave the
      // comparison without the episodes it is computed from).
      const chosen = new Set(found.map((r) => r.id));
      members = found.filter((r) => r.parentId !== null && !chosen.has(r.parentId));
      // (members whose comparison goes are deleted with it)
      targets = found.filter((r) => r.status !== 'running' && r.parentId === null);
    }
    const episodes = targets.reduce((n, r) => n + (r.kind === 'comparison' ? listMembers(db, r.id).reduce((m, x) => m + x.episodesDone, 0) : r.episodesDone), 0);
    const ids = targets.map((r) => r.id);
    const orphaned = comparisonsDependingOn(db, ids);
    const report = (deleted: boolean) => {
      if (values.json) {
        process.stdout.write(`${JSON.stringify({ store: storeLabel, dry_run: !deleted, deleted: deleted ? ids : [], would_delete: deleted ? [] : ids, episodes, kept_running: live.map((r) => r.id), kept_members: members.map((r) => r.id), orphaned_comparisons: orphaned }, null, 2)}\n`);
        return;
      }
      const keptNote =
        (live.length ? `Kept ${live.length} running run${live.length === 1 ? '' : 's'} (${live.map((r) => r.id).join(', ')}): a running run is never deleted.\n` : '') +
        (members.length ? `Kept ${members.length} member run${members.length === 1 ? '' : 's'} of comparisons (${members.map((r) => r.id).join(', ')}): delete the comparison to delete them.\n` : '') +
        (orphaned.length ? orphanNote(orphaned, deleted) : '');
      if (!deleted) process.stdout.write(`${targets.length === 0 ? 'No runs match: nothing would be deleted.\n' : `Would delete ${targets.length} run${targets.length === 1 ? '' : 's'} (${episodes.toLocaleString('en-US')} episodes) from ${storeLabel}:\n${runsListText(targets)}`}${keptNote}`);
      else process.stdout.write(`Deleted ${targets.length === 1 ? `run ${ids[0]}` : `${targets.length} runs`} and ${targets.length === 1 ? 'its' : 'their'} episodes from ${storeLabel}.${targets.length > 1 ? ` (${ids.join(', ')})` : ''}\n${keptNote}`);
    };
    if (values['dry-run'] || targets.length === 0) {
      report(false);
      return 0;
    }
    if (positionals.length === 0 && !values.yes) {
      if (!process.stdin.isTTY) {
        throw new InputError('runs delete', `would delete ${targets.length} run${targets.length === 1 ? '' : 's'} found by the filters; add --yes to confirm (there is no terminal to ask), and see them first with --dry-run`);
      }
      process.stderr.write(runsListText(targets));
      if (!(await confirm(`Delete these ${targets.length} runs (${episodes.toLocaleString('en-US')} episodes) from ${storeLabel}? [y/N] `))) {
        process.stderr.write('Nothing deleted.\n');
        return 1;
      }
    }
    db.transaction(() => {
      for (const id of ids) deleteRun(db, id);
    })();
    report(true);
  } finally {
    db.close();
  }
  return 0;
}

/** Names the stored `runs compare` results that lose (or would lose) the runs they are computed from. */
function orphanNote(ids: readonly string[], deleted: boolean): string {
  const one = ids.length === 1;
  const what = `Stored comparison${one ? '' : 's'} ${ids.join(', ')} compare${one ? 's' : ''}`;
  const then = deleted ? 'deleted runs and can no longer be recomputed' : 'runs that would go, and could then no longer be recomputed';
  return `${what} ${then}; delete ${one ? 'it' : 'them'} too with 'reckon runs delete ${ids.join(' ')}'.\n`;
}

function bytesOf(file: string): number {
  try {
    return statSync(file).size;
  } catch {
    return 0;
  }
}

/** `runs vacuum`: gives the space of deleted runs back to the file system. */
export function vacuum(args: string[], help: string): number {
  const { values } = parseCommandArgs('runs', args, { store: { type: 'string' }, json: { type: 'boolean' } });
  if (values.help) {
    process.stdout.write(help);
    return 0;
  }
  const storeLabel = values.store ?? defaultStorePath();
  const db = openStore(storeLabel, { readonly: true });
  const size = () => bytesOf(storeLabel) + bytesOf(`${storeLabel}-wal`);
  const before = size();
  try {
    db.pragma('wal_checkpoint(TRUNCATE)');
    db.exec('VACUUM');
    db.pragma('wal_checkpoint(TRUNCATE)');
  } catch (e) {
    const code = (e as { code?: string }).code ?? '';
    if (code.startsWith('SQLITE_BUSY') || code.startsWith('SQLITE_LOCKED')) {
      throw new InputError(`store ${storeLabel}`, 'is in use by another reckon (a running run or a review server); vacuum it when that has ended');
    }
    throw e;
  } finally {
    db.close();
  }
  const after = size();
  if (values.json) process.stdout.write(`${JSON.stringify({ store: storeLabel, bytes_before: before, bytes_after: after, bytes_freed: Math.max(0, before - after) }, null, 2)}\n`);
  else process.stdout.write(`store ${storeLabel}: ${mb(before)} → ${mb(after)} (${mb(Math.max(0, before - after))} given back)\n`);
  return 0;
}

function mb(bytes: number): string {
  return `${(bytes / 1e6).toFixed(2)} MB`;
}

/** A CSV field, quoted when it holds a comma, a quote or a line break (RFC 4180). */
function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * `runs export ID ID… [--long]`: every episode of several runs in one long table, one row an
 * episode (`run_id,labels,episode,return,length`), which a notebook reads in one call
 * (`pandas.read_csv`). A comparison contributes its member runs, with its labels.
 */
export function exportLong(ids: readonly string[], storeOption: string | undefined, format: 'csv' | 'json', out: string | undefined): number {
  const storeLabel = storeOption ?? defaultStorePath();
  const db = openStore(storeLabel, { readonly: true });
  let text: string;
  try {
    const runs: { run: RunRecord; labels: Record<string, string> }[] = [];
    for (const id of ids) {
      const run = getRun(db, id, storeLabel);
      if (run.kind === 'offpolicy') throw new InputError(id, `is an off-policy run: it ran no episodes to export; 'reckon runs show ${id} --json' gives its figures`);
      if (run.kind === 'comparison') {
        const members = listMembers(db, run.id);
        if (members.length === 0) throw new InputError(id, 'is a comparison of stored runs: export the runs it compares instead');
        for (const m of members) runs.push({ run: m, labels: { ...run.labels, ...m.labels } });
      } else {
        runs.push({ run, labels: { ...run.labels } });
      }
    }
    const labelText = (labels: Record<string, string>) =>
      Object.entries(labels)
        .map(([k, v]) => `${k}=${v}`)
        .join(';');
    if (format === 'json') {
      text = `${JSON.stringify({
        runs: runs.map(({ run, labels }) => {
          const { returns, lengths } = loadEpisodes(db, run);
          return { run_id: run.id, labels, env: run.env.label, policy: run.policy.label, seed: run.seed, noise: run.noise, first_episode: run.firstEpisode, returns: Array.from(returns), lengths: Array.from(lengths) };
        }),
      })}\n`;
    } else {
      const lines = ['run_id,labels,episode,return,length'];
      for (const { run, labels } of runs) {
        const { returns, lengths } = loadEpisodes(db, run);
        const prefix = `${run.id},${csvField(labelText(labels))}`;
        for (let i = 0; i < returns.length; i++) lines.push(`${prefix},${run.firstEpisode + i},${returns[i]},${lengths[i]}`);
      }
      text = `${lines.join('\n')}\n`;
    }
  } finally {
    db.close();
  }
  if (out) writeOutputFile('--out', out, text);
  else process.stdout.write(text);
  return 0;
}
