import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { displayPath, type DefinitionFileHash } from '../store/definition-files.js';
import type { RunRecord, StoredDefinition } from '../store/runs.js';

/** A recorded definition file and whether the file on disk still has the recorded content. */
export interface FileCheck {
  readonly role: DefinitionFileHash['role'];
  readonly path: string;
  readonly sha256: string | null;
  /** `unchanged`, `changed`, `missing` (gone since), or `appeared` (missing then, there now). */
  readonly now: 'unchanged' | 'changed' | 'missing' | 'appeared';
}

function sha256Of(file: string): string | null {
  try {
    return createHash('sha256').update(readFileSync(file)).digest('hex');
  } catch {
    return null;
  }
}

/** Each file the run was defined by, checked against the disk now (null: the run recorded none). */
export function checkFiles(files: readonly DefinitionFileHash[] | null): FileCheck[] | null {
  if (files === null) return null;
  return files.map((f) => {
    const now = sha256Of(f.path);
    const state = now === f.sha256 ? 'unchanged' : now === null ? 'missing' : f.sha256 === null ? 'appeared' : 'changed';
    return { role: f.role, path: f.path, sha256: f.sha256, now: state };
  });
}

/** A word for a shell: quoted when it holds anything a shell would read specially. */
export function shellWord(word: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(word) ? word : `'${word.replace(/'/g, `'\\''`)}'`;
}

/** The file a definition came from, as a path that works from here, or its label when it came from none. */
function definitionPath(definition: StoredDefinition, recorded: string | undefined): { path: string; fromFile: boolean } {
  if (recorded) return { path: displayPath(recorded), fromFile: true };
  const guess = definition.baseDir ? path.resolve(definition.baseDir, path.basename(definition.label)) : '';
  return guess && existsSync(guess) ? { path: displayPath(guess), fromFile: true } : { path: definition.label, fromFile: false };
}

interface Options {
  episodes?: number;
  method?: string | null;
  sequence?: string | null;
  level?: number;
  bounds?: [number, number] | null;
  sigma?: number | null;
  targetError?: number | null;
  targetEvent?: string | null;
  interquartileMean?: boolean;
  policies?: string[];
  fromRuns?: string[];
  allowEnvChange?: boolean;
  behaviour?: string | null;
  estimators?: string[];
  resamples?: number;
  folds?: number;
}

/**
 * The command line that reproduces a run's figures (`reckon estimate … --seed S --episodes N`),
 * from what the run stored; `fromFiles` is false when its definitions came from no file (the
 * review page's form), so they must be written to files first.
 */
export function reproduceCommand(run: RunRecord, members: readonly RunRecord[] = []): { command: string; fromFiles: boolean } {
  const o = run.options as Options;
  const words: string[] = ['reckon'];
  let fromFiles = true;
  const definition = (flag: string, d: StoredDefinition, recorded: string | undefined) => {
    const p = definitionPath(d, recorded);
    fromFiles &&= p.fromFile;
    words.push(flag, p.path);
  };
  const firstFile = (role: DefinitionFileHash['role']) => run.files?.find((f) => f.role === role)?.path;
  const common = () => {
    if (run.start !== null) words.push('--start', run.start);
    if (run.noise !== 'step') words.push('--noise', run.noise);
    if (o.level !== undefined && o.level !== 0.95) words.push('--confidence', String(o.level));
    if (o.bounds) words.push('--bounds', o.bounds.join(','));
    if (o.sigma !== undefined && o.sigma !== null) words.push('--sigma', String(o.sigma));
  };
  if (run.kind === 'comparison' && o.fromRuns) {
    words.push('runs', 'compare', ...o.fromRuns);
    if (o.method && o.method !== 't') words.push('--ci', o.method);
    if (o.level !== undefined && o.level !== 0.95) words.push('--confidence', String(o.level));
    if (o.interquartileMean) words.push('--iqm');
    if (o.allowEnvChange) words.push('--allow-env-change');
  } else if (run.kind === 'comparison') {
    words.push('compare');
    definition('--env', run.env, firstFile('environment'));
    members.forEach((m) => definition('--policy', m.policy, m.files?.find((f) => f.role === 'policy')?.path));
    words.push('--seed', String(run.seed));
    if (o.targetError !== null && o.targetError !== undefined) words.push('--target-error', String(o.targetError), '--max-episodes', String(o.episodes));
    else words.push('--episodes', String(o.episodes ?? run.episodesRequested));
    const ci = o.sequence ?? (o.method && o.method !== 't' ? o.method : null);
    if (ci) words.push('--ci', ci);
    if (o.interquartileMean) words.push('--iqm');
    common();
  } else if (run.kind === 'offpolicy') {
    const log = (run.facts as { log?: { label?: string } } | null)?.log?.label ?? 'LOG.jsonl';
    words.push('offpolicy', '--log', log);
    definition('--policy', run.policy, firstFile('policy'));
    if (run.env.json !== null) definition('--env', run.env, firstFile('environment'));
    if (o.behaviour) words.push('--behaviour', o.behaviour);
    if (o.estimators) words.push('--estimator', o.estimators.join(','));
    if (o.level !== undefined && o.level !== 0.95) words.push('--confidence', String(o.level));
    if (o.resamples !== undefined) words.push('--resamples', String(o.resamples));
    if (o.folds !== undefined) words.push('--folds', String(o.folds));
    words.push('--seed', String(run.seed));
  } else {
    words.push('estimate');
    definition('--env', run.env, firstFile('environment'));
    definition('--policy', run.policy, firstFile('policy'));
    words.push('--seed', String(run.seed));
    if (o.targetError !== null && o.targetError !== undefined) {
      words.push('--target-error', String(o.targetError), '--max-episodes', String(o.episodes));
      if (o.targetEvent) words.push('--target-event', o.targetEvent);
    } else {
      words.push('--episodes', String(run.shard ? run.shard.total : (o.episodes ?? run.episodesRequested)));
    }
    if (run.shard) words.push('--shard', `${run.shard.index}/${run.shard.count}`);
    if (o.method && o.method !== 't') words.push('--ci', o.method);
    common();
  }
  return { command: words.map(shellWord).join(' '), fromFiles };
}

/** The provenance keys of a run object: the files checked against the disk and the reproducing command. */
export function provenanceJson(run: RunRecord, members: readonly RunRecord[] = []) {
  const reproduce = reproduceCommand(run, members);
  return {
    files: checkFiles(run.files)?.map((f) => ({ role: f.role, path: f.path, sha256: f.sha256, on_disk: f.now })) ?? null,
    reproduce_command: reproduce.command,
    reproduce_from_files: reproduce.fromFiles,
  };
}

/** The provenance block `runs show` prints under a run's report. */
export function provenanceText(run: RunRecord, members: readonly RunRecord[] = []): string {
  const reproduce = reproduceCommand(run, members);
  const lines = ['', 'Provenance', `  reproduce with: ${reproduce.command}`];
  if (!reproduce.fromFiles) lines.push(`    (its definitions were given inline, not from files: write them to files first; 'GET /api/runs/${run.id}/definitions' gives them)`);
  const files = checkFiles(run.files);
  if (files === null) lines.push('  definition files: not recorded (stored by an older reckon)');
  else if (files.length === 0) lines.push('  definition files: none (definitions given inline)');
  else {
    lines.push('  definition files (sha256 when the run started, and the file on disk now):');
    const words = { unchanged: 'unchanged', changed: 'CHANGED since', missing: 'MISSING now', appeared: 'missing then, present now' };
    for (const f of files) lines.push(`    ${displayPath(f.path)} (${f.role}) ${f.sha256 ? f.sha256.slice(0, 12) : '(missing)'}: ${words[f.now]}`);
  }
  const m = run.machine as { host?: string; cores?: number; cpu?: string; node?: string; platform?: string };
  lines.push(`  reckon ${run.toolVersion} on ${[m.host, m.cores !== undefined ? `${m.cores} cores` : null, m.cpu, m.node ? `Node ${m.node}` : null, m.platform].filter(Boolean).join(', ')}`);
  return `${lines.join('\n')}\n`;
}
