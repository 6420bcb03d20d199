import path from 'node:path';
import { readDefinitionFile } from '../definitions/index.js';
import { parseRunFilter } from '../options/run-filter-options.js';
import { definitionHash } from '../store/definition-hash.js';
import { olderVersionsOf, type OlderVersion } from '../store/env-versions.js';
import type { Db } from '../store/open.js';
import type { RunFilter } from '../store/runs.js';
import type { OptionSpec } from './args.js';

/** The options that find runs, shared by `runs list` and `runs delete`. */
export const FILTER_OPTIONS = {
  label: { type: 'string', multiple: true },
  env: { type: 'string' },
  'env-hash': { type: 'string' },
  policy: { type: 'string' },
  since: { type: 'string' },
  until: { type: 'string' },
  status: { type: 'string' },
  kind: { type: 'string' },
  text: { type: 'string' },
} as const satisfies OptionSpec;

export const FILTER_HELP = `  --label KEY=VALUE     runs with that label (repeatable: all must match); KEY alone: any value
  --env FILE            runs of that environment file as it is now (its definition hash), and
                        a line naming the runs that used an older version of it
  --env-hash H          runs whose environment hash starts with H
  --policy NAME         runs whose policy name contains NAME
  --since T, --until T  started in that time: a date (2026-11-02; --until includes the day),
                        a UTC date and time (2026-11-02T14:30), or back from now (36h, 7d, 2w)
  --status S[,S]        running, done, interrupted, failed
  --kind K[,K]          estimate, comparison, offpolicy
  --text WORDS          runs whose notes, environment or policy names or file paths contain it
`;

export interface FilterValues {
  label?: string[];
  env?: string;
  'env-hash'?: string;
  policy?: string;
  since?: string;
  until?: string;
  status?: string;
  kind?: string;
  text?: string;
}

export interface ParsedFilter {
  readonly filter: RunFilter;
  /** With `--env FILE`: the file, its hash now, and the runs of its older versions. */
  readonly envFile: { path: string; hash: string; older: OlderVersion[] } | null;
  /** True when any filter was given (so an empty result is "none match", not "none stored"). */
  readonly any: boolean;
}

export function filterFrom(db: Db, values: FilterValues): ParsedFilter {
  const choice = parseRunFilter(
    { label: values.label, since: values.since, until: values.until, status: values.status, kind: values.kind, text: values.text, policy: values.policy, envHash: values['env-hash'] },
    (name) => `--${name}`,
  );
  let envFile: ParsedFilter['envFile'] = null;
  if (values.env !== undefined) {
    const file = readDefinitionFile(values.env);
    const hash = definitionHash(file.json, file.source.baseDir);
    envFile = { path: values.env, hash, older: olderVersionsOf(db, path.resolve(values.env), hash) };
  }
  const filter: RunFilter = {
    envHash: choice.envHash ?? undefined,
    envHashes: envFile ? [envFile.hash] : undefined,
    policy: choice.policy ?? undefined,
    labels: choice.labels,
    since: choice.since,
    until: choice.until,
    statuses: choice.statuses,
    kinds: choice.kinds,
    text: choice.text,
  };
  const any = Object.keys(FILTER_OPTIONS).some((key) => values[key as keyof FilterValues] !== undefined);
  return { filter, envFile, any };
}

/** The line `--env FILE` adds when stored runs used older versions of the file. */
export function olderVersionsText(envFile: NonNullable<ParsedFilter['envFile']>): string {
  if (envFile.older.length === 0) return '';
  const runs = envFile.older.reduce((n, o) => n + o.runIds.length, 0);
  const versions = envFile.older
    .map((o) => `hash ${o.hash.slice(0, 12)}: ${o.runIds.length} run${o.runIds.length === 1 ? '' : 's'}, last ${o.lastUsed.slice(0, 10)}`)
    .join('; ');
  return `${runs} stored run${runs === 1 ? '' : 's'} used an older version of ${envFile.path} (${versions}); list them with --env-hash ${envFile.older[0].hash.slice(0, 12)}\n`;
}
