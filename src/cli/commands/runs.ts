import { offPolicyText } from '../../report/offpolicy-text.js';
import type { OffPolicyJson } from '../../report/offpolicy-json.js';
import { InputError, StoppedEarly } from '../../errors.js';
import type { EstimateResult } from '../../evaluate/estimate.js';
import { analyzeStoredRun, resumeStoredEstimate } from '../../evaluate/stored-estimate.js';
import { estimateJson } from '../../report/estimate-json.js';
import { estimateText } from '../../report/estimate-text.js';
import { runsListText } from '../../report/runs-text.js';
import { annotationsJson, runProvenanceJson, comparisonShowJson, runListRow, runPendingJson, runShowJson } from '../../report/run-json.js';
import { annotationsText } from '../../report/annotations-text.js';
import { provenanceJson, provenanceText } from '../../report/provenance.js';
import { analyzeRunsComparisonRun, isRunsCompareRecord } from '../../evaluate/runs-compare-store.js';
import { runsCompareJson, runsCompareText } from '../../report/runs-compare-report.js';
import { analyzeStoredComparison, resumeStoredComparison } from '../../evaluate/stored-compare.js';
import { compareJson } from '../../report/compare-json.js';
import { compareText } from '../../report/compare-text.js';
import { defaultStorePath } from '../../store/location.js';
import { mergeShards } from '../../store/merge.js';
import { checkStore } from '../../store/check.js';
import { openStore, type Db } from '../../store/open.js';
import { getRun, listMembers, listRuns, loadEpisodes, type RunRecord } from '../../store/runs.js';
import { writeOutputFile } from '../output-file.js';
import { FILTER_HELP, FILTER_OPTIONS, filterFrom, olderVersionsText } from '../run-filter.js';
import { exportLong } from './runs-housekeeping.js';
import { riskRequestFrom } from '../../options/risk-options.js';
import { existsSync, rmSync } from 'node:fs';
import { parseCommandArgs, type OptionSpec } from '../args.js';
import { parseOption } from '../../options/parse-option.js';
import { ProgressLine } from '../progress.js';
import { reportStoppedEarly, StopSignals } from '../stop-signals.js';
import { version } from '../version.js';
import { count } from '../../report/format.js';

export const HELP = `reckon runs: find, label, review, re-analyse, compare, export, resume, merge and tidy stored runs

Usage:
  reckon runs list [filters] [--limit N] [--all] [--json]
  reckon runs show ID [--ci METHOD] [--confidence L] [--ignore-stop] [--risk ...] [--json]
  reckon runs compare ID ID [ID...] [--ci t|bootstrap|bootstrap-percentile] [--confidence L]
                   [--iqm] [--allow-env-change] [--store-result] [--json]
  reckon runs label ID KEY=VALUE... [--remove KEY] [--json]
  reckon runs note ID TEXT [--json]
  reckon runs export ID --format csv|json [--out FILE]
  reckon runs export ID ID... [--long] [--format csv|json] [--out FILE]
  reckon runs plot ID --out FILE.svg [--kind convergence|histogram|lengths|value-map|cdf] [--arrows]
  reckon runs resume ID [--workers K] [--step-timeout SECONDS] [--json]
  reckon runs delete ID... | [filters] [--all] [--dry-run] [--yes] [--json]
  reckon runs vacuum [--json]
  reckon runs merge DB... [--into DB]
  reckon runs check [--json]

Filters (runs list; runs delete takes them too):
${FILTER_HELP}
Every subcommand takes --store PATH (default: $RECKON_STORE, else
~/.local/share/reckon/runs.sqlite).

  list     newest first: id, start time, environment, policy, episodes, mean ± half-width,
           interval method, status; a comparison's member runs (one a policy) under it, or
           with --all as runs of their own
  show     the estimate's report recomputed from the stored returns; --ci and --confidence
           re-analyse them without new episodes. A run that stopped at a target error keeps
           an anytime-valid sequence (betting, empirical-bernstein, ...); --ignore-stop allows
           a fixed-sample interval as a what-if; --risk (with --quantiles, --tail,
           --event as for estimate) adds quantiles, the worst-α mean and event probabilities.
           Ends with the run's provenance: the command that reproduces it, its definition
           files' hashes and whether each file still matches, reckon's version, the machine
  label    set labels on a run (a key it has takes the new value), or --remove them;
           estimate, compare and offpolicy take --label KEY=VALUE when they start one
  note     add a note to a run (notes are kept in order; estimate, compare and offpolicy
           take --note TEXT)
  compare  stored estimate runs, without running an episode: runs of one environment,
           seed, episode range and noise mode ran on common random numbers and are paired
           by episode, giving exactly what 'reckon compare' gives; others are compared as
           independent samples (Welch's interval, Holm-adjusted for three or more), and
           the report says why they could not be paired. Runs of different environment
           hashes are refused unless --allow-env-change (the report names what differs).
           --store-result keeps the result as a comparison run (runs show, the page)
  export   every episode's return and length, for a notebook or a spreadsheet; for a
           comparison, the paired returns: one row an episode, one column a policy.
           Several ids (or --long) give one long table, run_id,labels,episode,return,length,
           that a notebook reads in one call
  plot     a run's plot as SVG (the review page's look): convergence (default), histogram of
           returns, lengths, value-map (gridworlds: start cells marked S, portals ↪ the
           cell they lead to; --arrows adds the policy's likeliest moves), or cdf (the
           returns' distribution with its DKW band)
  resume   continue an interrupted run (Ctrl-C, a crash, a killed job) from its last
           committed episode; the result equals an uninterrupted run's. A comparison
           continues every policy on the same episodes (common random numbers)
  delete   remove runs and their episodes: the runs named (at once), or those the filters
           find, listed and confirmed first unless --yes (--dry-run lists them and deletes
           nothing); a running run is never deleted
  vacuum   give the space of deleted runs back to the disk
  merge    join the shards of one run ('estimate --shard K/M' on several machines, each with
           its own store) into one run in --into (default: --store)
  check    SQLite's integrity check of the store, and reckon's own: every run's stored
           chunks against its episode count; exit 2 when anything is wrong

Examples:
  reckon runs list --policy picker --limit 5
  reckon runs list --label reported=yes --since 30d
  reckon runs list --env envs/warehouse.json --status done --kind estimate
  reckon runs show k3x9p2ab --ci bootstrap
  reckon runs compare k3x9p2ab m7wq4ctz --store-result
  reckon runs label k3x9p2ab reported=yes quarter=q4
  reckon runs note k3x9p2ab "the figure in the safety review"
  reckon runs export k3x9p2ab --format csv --out returns.csv
  reckon runs export k3x9p2ab m7wq4ctz --out returns.csv
  reckon runs delete --label draft=yes --until 30d --dry-run
  reckon runs merge shard-1.sqlite shard-2.sqlite shard-3.sqlite --into all.sqlite
`;

const COMMON = { store: { type: 'string' }, json: { type: 'boolean' } } as const satisfies OptionSpec;

function storeFor(value: string | undefined, readonly = true): { db: Db; label: string } {
  const label = value ?? defaultStorePath();
  return { db: openStore(label, { readonly }), label };
}

function oneId(sub: string, positionals: string[]): string {
  if (positionals.length !== 1) {
    throw new InputError(`runs ${sub}`, `needs exactly one run id (got ${positionals.length}); see the ids with 'reckon runs list'`);
  }
  return positionals[0];
}

export async function run(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === undefined || sub === '--help' || sub === '-h') {
    process.stdout.write(HELP);
    return sub === undefined ? 2 : 0;
  }
  switch (sub) {
    case 'list':
      return list(rest);
    case 'show':
      return show(rest);
    case 'export':
      return exportRun(rest);
    case 'plot':
      return (await import('./runs-plot.js')).plot(rest, HELP);
    case 'resume':
      return resume(rest);
    case 'delete':
      return (await import('./runs-housekeeping.js')).remove(rest, HELP);
    case 'vacuum':
      return (await import('./runs-housekeeping.js')).vacuum(rest, HELP);
    case 'merge':
      return merge(rest);
    case 'check':
      return check(rest);
    case 'compare':
      return (await import('./runs-compare.js')).compareRuns(rest, HELP);
    case 'label':
      return (await import('./runs-annotate.js')).label(rest, HELP);
    case 'note':
      return (await import('./runs-annotate.js')).note(rest, HELP);
    default:
      throw new InputError('runs', `unknown subcommand "${sub}"; choose list, show, label, note, compare, export, plot, resume, delete, vacuum, merge or check (see 'reckon runs --help')`);
  }
}

function wantsHelp(values: { help?: boolean }): boolean {
  if (values.help) process.stdout.write(HELP);
  return Boolean(values.help);
}

function list(args: string[]): number {
  const { values } = parseCommandArgs('runs', args, {
    ...COMMON,
    ...FILTER_OPTIONS,
    limit: { type: 'string' },
    all: { type: 'boolean' },
  });
  if (wantsHelp(values)) return 0;
  const limit = values.limit === undefined ? 20 : parseOption('limit', 'limit', values.limit);
  const { db } = storeFor(values.store);
  try {
    const { filter, envFile, any } = filterFrom(db, values);
    // Comparisons' member runs are listed under their comparison, or (--all) as runs of their own.
    const runs = listRuns(db, { ...filter, limit, parentId: values.all ? undefined : null });
    const members = new Map(runs.filter((r) => r.kind === 'comparison').map((r) => [r.id, listMembers(db, r.id)]));
    const older = envFile ? olderVersionsText(envFile) : '';
    if (values.json) {
      const rows = runs.map((r) => runListRow(r, members.get(r.id) ?? null));
      process.stdout.write(`${JSON.stringify(rows, null, 2)}\n`);
      if (older) process.stderr.write(`reckon: ${older}`);
    } else {
      process.stdout.write(runs.length === 0 && any ? 'No stored runs match these filters.\n' : runsListText(runs, values.all ? new Map() : members));
      if (older) process.stdout.write(`\n${older}`);
    }
  } finally {
    db.close();
  }
  return 0;
}

/** The risk options, shared with estimate (see src/options/risk-options.ts). */
const RISK_OPTIONS = { risk: { type: 'boolean' }, quantiles: { type: 'string' }, tail: { type: 'string' }, event: { type: 'string', multiple: true } } as const;

function show(args: string[]): number {
  const { values, positionals } = parseCommandArgs(
    'runs',
    args,
    { ...COMMON, ci: { type: 'string' }, confidence: { type: 'string' }, 'ignore-stop': { type: 'boolean' }, ...RISK_OPTIONS },
    true,
  );
  if (wantsHelp(values)) return 0;
  const id = oneId('show', positionals);
  const risk = riskRequestFrom(values);
  const method = values.ci === undefined ? undefined : parseOption('ci', 'interval', values.ci);
  const level = values.confidence === undefined ? undefined : parseOption('confidence', 'confidence', values.confidence);
  const { db, label } = storeFor(values.store);
  try {
    const run = getRun(db, id, label);
    const progress = new ProgressLine();
    const onAnalysis = (step: string, done: number, total: number) => progress.analysis(step, done, total);
    if (run.kind === 'offpolicy') {
      // Nothing to recompute: the figures are those of the run, kept whole as its summary.
      if (values.json) process.stdout.write(`${JSON.stringify({ ...run.summary, status: run.status, created_at: run.createdAt, tool_version: run.toolVersion, machine: run.machine, ...annotationsJson(run), ...provenanceJson(run) }, null, 2)}\n`);
      else process.stdout.write(`Run ${run.id} (off-policy, ${run.status}), started ${run.createdAt}, reckon ${run.toolVersion}\n${annotationsText(run)}\n${offPolicyText(run.summary as unknown as OffPolicyJson)}${provenanceText(run)}`);
      return 0;
    }
    if (isRunsCompareRecord(run)) {
      const comparison = analyzeRunsComparisonRun(db, run);
      if (values.json) process.stdout.write(`${JSON.stringify({ ...runsCompareJson(comparison, run.toolVersion, run.id), kind: 'comparison', ...runProvenanceJson(run) }, null, 2)}\n`);
      else process.stdout.write(`Run ${run.id} (comparison of stored runs, ${run.status}), made ${run.createdAt}, reckon ${run.toolVersion}\n${annotationsText(run)}\n${runsCompareText(comparison)}${provenanceText(run)}`);
      return 0;
    }
    if (run.kind === 'comparison') {
      const { result, labels } = analyzeStoredComparison(db, run, onAnalysis, risk);
      progress.clear();
      const members = listMembers(db, run.id);
      if (values.json) {
        process.stdout.write(`${JSON.stringify(comparisonShowJson(run, result, labels, members), null, 2)}\n`);
      } else {
        const parts = members.map((m, p) => `[${p}] ${m.id}`).join(', ');
        process.stdout.write(`Run ${run.id} (comparison, ${run.status}), started ${run.createdAt}, reckon ${run.toolVersion}\n  member runs, one a policy: ${parts}\n${annotationsText(run)}\n${compareText(result, labels)}${provenanceText(run, members)}`);
      }
      return 0;
    }
    const header = `Run ${run.id} (${run.status}${run.shard ? `, shard ${run.shard.index}/${run.shard.count}` : ''}), started ${run.createdAt}, reckon ${run.toolVersion}\n`;
    if (run.episodesDone < 2) {
      // Too few episodes for figures (it failed or stopped at once): say where it stands.
      if (values.json) process.stdout.write(`${JSON.stringify(runPendingJson(run), null, 2)}\n`);
      else process.stdout.write(`${header}${annotationsText(run)}  ${run.episodesDone} episode(s) stored: too few for an interval.\n${statusNote(run, values.store ?? '')}`);
      return 0;
    }
    const result = analyzeStoredRun(db, run, { method, level, onAnalysis, ignoreStop: values['ignore-stop'] === true, risk });
    progress.clear();
    const labels = { env: run.env.label, policy: run.policy.label };
    if (values.json) {
      process.stdout.write(`${JSON.stringify(runShowJson(run, result), null, 2)}\n`);
    } else {
      process.stdout.write(header);
      process.stdout.write(`  environment hash ${run.env.hash.slice(0, 12)}, policy hash ${run.policy.hash.slice(0, 12)}\n${annotationsText(run)}\n`);
      process.stdout.write(estimateText(result, labels));
      process.stdout.write(statusNote(run, values.store ?? ''));
      process.stdout.write(provenanceText(run));
    }
  } finally {
    db.close();
  }
  return 0;
}

/** What a run that is not done still needs, under its report. */
function statusNote(run: RunRecord, storeOption: string): string {
  const store = storeOption ? ` --store ${storeOption}` : '';
  switch (run.status) {
    case 'running':
      return `\n  Still running (process ${run.ownerPid}${run.ownerHost ? ` on ${run.ownerHost}` : ''}): the figures above cover the episodes committed so far.\n`;
    case 'interrupted':
      return `\n  Interrupted after ${count(run.episodesDone)} of ${count(run.episodesRequested)} episodes: continue it with 'reckon runs resume ${run.id}${store}'.\n`;
    case 'failed':
      return `\n  Failed: ${run.error ?? 'no reason was recorded'}\n  The ${run.episodesDone} episodes committed before the failure are kept; once the cause is fixed, 'reckon runs resume ${run.id}${store}' continues it.\n`;
    default:
      return '';
  }
}

function exportRun(args: string[]): number {
  const { values, positionals } = parseCommandArgs('runs', args, { store: { type: 'string' }, format: { type: 'string' }, out: { type: 'string' }, long: { type: 'boolean' } }, true);
  if (wantsHelp(values)) return 0;
  const format = values.format ?? 'csv';
  if (format !== 'csv' && format !== 'json') throw new InputError('--format', `must be csv or json (got "${format}")`);
  if (positionals.length > 1 || (values.long && positionals.length === 1)) return exportLong(positionals, values.store, format, values.out);
  const id = oneId('export', positionals);
  const { db, label } = storeFor(values.store);
  let text: string;
  try {
    const run = getRun(db, id, label);
    if (run.kind === 'offpolicy') {
      const log = (run.facts as { log?: { label?: string } } | null)?.log?.label ?? 'a log';
      throw new InputError(id, `is an off-policy run of ${log}: it ran no episodes to export; 'reckon runs show ${id} --json' gives its figures`);
    }
    if (run.kind === 'comparison') {
      text = comparisonExport(db, run, format);
      return finishExport(values.out, text);
    }
    const { returns, lengths } = loadEpisodes(db, run);
    if (format === 'csv') {
      const lines = ['episode,return,length'];
      for (let i = 0; i < returns.length; i++) lines.push(`${run.firstEpisode + i},${returns[i]},${lengths[i]}`);
      text = lines.join('\n') + '\n';
    } else {
      text = `${JSON.stringify({ run_id: run.id, seed: run.seed, noise: run.noise, first_episode: run.firstEpisode, returns: Array.from(returns), lengths: Array.from(lengths) })}\n`;
    }
  } finally {
    db.close();
  }
  return finishExport(values.out, text);
}

function finishExport(out: string | undefined, text: string): number {
  if (out) writeOutputFile('--out', out, text);
  else process.stdout.write(text);
  return 0;
}

/** A CSV field, quoted when it holds a comma, a quote or a line break (RFC 4180). */
function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * A comparison's paired returns: one row an episode, one column a policy, in episode order,
 * so row i holds what every policy returned facing the same environment noise.
 */
function comparisonExport(db: Db, run: RunRecord, format: 'csv' | 'json'): string {
  const members = listMembers(db, run.id);
  const names = ((run.options as { policies?: string[] }).policies ?? members.map((m) => m.policy.label));
  const episodes = members.map((m) => loadEpisodes(db, m));
  const paired = Math.min(...episodes.map((e) => e.returns.length));
  if (format === 'json') {
    return `${JSON.stringify({
      run_id: run.id,
      kind: 'comparison',
      seed: run.seed,
      noise: run.noise,
      first_episode: 0,
      policies: names,
      members: members.map((m) => m.id),
      returns: episodes.map((e) => Array.from(e.returns.subarray(0, paired))),
      lengths: episodes.map((e) => Array.from(e.lengths.subarray(0, paired))),
    })}\n`;
  }
  const lines = [['episode', ...names].map(csvField).join(',')];
  for (let i = 0; i < paired; i++) lines.push(`${i},${episodes.map((e) => e.returns[i]).join(',')}`);
  return lines.join('\n') + '\n';
}

async function resume(args: string[]): Promise<number> {
  const { values, positionals } = parseCommandArgs('runs', args, { ...COMMON, workers: { type: 'string' }, 'step-timeout': { type: 'string' } }, true);
  if (wantsHelp(values)) return 0;
  const id = oneId('resume', positionals);
  const workers = values.workers === undefined ? undefined : parseOption('workers', 'workers', values.workers);
  const stepTimeout = values['step-timeout'] === undefined ? undefined : parseOption('step-timeout', 'stepTimeout', values['step-timeout']);
  const { db, label } = storeFor(values.store);
  const progress = new ProgressLine();
  const stop = new StopSignals();
  try {
    const run = getRun(db, id, label);
    const storeOption = values.store ? ` --store ${label}` : '';
    if (run.kind === 'comparison') return await resumeComparison(db, run, { json: Boolean(values.json), storeOption, stop, progress, workers, stepTimeout });
    if (run.parentId) {
      throw new InputError(`run ${run.id}`, `is one policy's part of comparison ${run.parentId}, whose policies share their episodes; resume the comparison: reckon runs resume ${run.parentId}${storeOption}`);
    }
    let result: EstimateResult;
    try {
      ({ result } = await resumeStoredEstimate(db, run, { signal: stop.signal, onProgress: (p) => progress.update(p), workers, stepTimeout }));
    } catch (e) {
      if (!(e instanceof StoppedEarly)) throw e;
      progress.clear();
      return reportStoppedEarly(e, stop, (runId) => `reckon runs resume ${runId}${values.store ? ` --store ${label}` : ''}`);
    }
    progress.clear();
    const labels = { env: run.env.label, policy: run.policy.label };
    if (values.json) process.stdout.write(`${JSON.stringify(estimateJson(result, labels, version(), run.id), null, 2)}\n`);
    else process.stdout.write(`Run ${run.id} resumed from episode ${run.firstEpisode + run.episodesDone}.\n\n${estimateText(result, labels)}`);
    if (result.interrupted) {
      const store = values.store ? ` --store ${label}` : '';
      process.stderr.write(`reckon: interrupted${stop.received ? ` (${stop.received})` : ''} again after ${count(result.episodes)} episodes, all kept. Continue it with: reckon runs resume ${run.id}${store}\n`);
      return stop.exitCode();
    }
  } finally {
    progress.clear();
    stop.dispose();
    db.close();
  }
  return 0;
}

/** `runs resume` of a comparison: every member continues, and the comparison's report is printed. */
async function resumeComparison(
  db: Db,
  run: RunRecord,
  how: { json: boolean; storeOption: string; stop: StopSignals; progress: ProgressLine; workers?: number; stepTimeout?: number },
): Promise<number> {
  const { stop, progress } = how;
  const from = Math.min(...listMembers(db, run.id).map((m) => m.episodesDone));
  let resumed: Awaited<ReturnType<typeof resumeStoredComparison>>;
  try {
    resumed = await resumeStoredComparison(db, run, {
      signal: stop.signal,
      onProgress: (p) => progress.update({ ...p, mean: Number.NaN }),
      workers: how.workers,
      stepTimeout: how.stepTimeout,
    });
  } catch (e) {
    if (!(e instanceof StoppedEarly)) throw e;
    progress.clear();
    return reportStoppedEarly(e, stop, (runId) => `reckon runs resume ${runId}${how.storeOption}`);
  }
  progress.clear();
  const { result, memberIds } = resumed;
  const labels = { env: run.env.label, policies: (run.options as { policies: string[] }).policies };
  if (how.json) process.stdout.write(`${JSON.stringify(compareJson(result, labels, version(), run.id, memberIds), null, 2)}\n`);
  else process.stdout.write(`Comparison ${run.id} resumed from episode ${from}.\n\n${compareText(result, labels)}`);
  if (result.interrupted) {
    process.stderr.write(`reckon: comparison interrupted${stop.received ? ` (${stop.received})` : ''} again after ${count(result.episodes)} paired episodes, all kept. Continue it with: reckon runs resume ${run.id}${how.storeOption}\n`);
    return stop.exitCode();
  }
  return 0;
}

function check(args: string[]): number {
  const { values } = parseCommandArgs('runs', args, COMMON);
  if (wantsHelp(values)) return 0;
  const { db, label } = storeFor(values.store);
  let result: ReturnType<typeof checkStore>;
  try {
    result = checkStore(db);
  } finally {
    db.close();
  }
  const ok = result.problems.length === 0;
  if (values.json) {
    process.stdout.write(`${JSON.stringify({ store: label, ok, runs: result.runs, episodes: result.episodes, problems: result.problems }, null, 2)}\n`);
  } else if (ok) {
    process.stdout.write(`store ${label}: no problems found (${result.runs} runs, ${result.episodes.toLocaleString('en-US')} episodes)\n`);
  } else {
    process.stdout.write(`store ${label}: ${result.problems.length} problem${result.problems.length === 1 ? '' : 's'}:\n${result.problems.map((p) => `  ${p}`).join('\n')}\n`);
    process.stderr.write(`reckon: store ${label} is damaged; restore it from a copy, or export the runs that still read ('reckon runs export ID')\n`);
  }
  return ok ? 0 : 2;
}

function merge(args: string[]): number {
  const { values, positionals } = parseCommandArgs('runs', args, { ...COMMON, into: { type: 'string' } }, true);
  if (wantsHelp(values)) return 0;
  if (positionals.length === 0) throw new InputError('runs merge', "needs the stores holding the shards, e.g. 'reckon runs merge a.sqlite b.sqlite --into all.sqlite'");
  const sources = positionals.map((file) => ({ label: file, db: openStore(file, { readonly: true }) }));
  const intoLabel = values.into ?? values.store ?? defaultStorePath();
  const created = !existsSync(intoLabel);
  const into = openStore(intoLabel);
  try {
    let merged: ReturnType<typeof mergeShards>;
    try {
      merged = mergeShards(sources, into, (run) => {
        const result = analyzeStoredRun(into, run);
        return { episodes: result.episodes, mean: result.mean, std: result.std, ci: result.ci };
      });
    } catch (e) {
      // A refused merge leaves no store behind that it made itself.
      if (created) {
        into.close();
        for (const suffix of ['', '-wal', '-shm']) rmSync(`${intoLabel}${suffix}`, { force: true });
      }
      throw e;
    }
    const { runId, parts } = merged;
    const run = getRun(into, runId, intoLabel);
    const result = analyzeStoredRun(into, run);
    const labels = { env: run.env.label, policy: run.policy.label };
    if (values.json) {
      process.stdout.write(`${JSON.stringify({ ...estimateJson(result, labels, version(), runId), merged_from: parts.map((p) => p.id) }, null, 2)}\n`);
    } else {
      process.stdout.write(`Merged ${parts.length} shards (${parts.map((p) => p.id).join(', ')}) into run ${runId} in ${intoLabel}.\n\n`);
      process.stdout.write(estimateText(result, labels));
    }
  } finally {
    for (const s of sources) s.db.close();
    into.close();
  }
  return 0;
}
