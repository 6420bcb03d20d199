/**
 * `--group NAME=FILE[,FILE…]` to the group's name and its member policies, each a definition
 * file ready for `compare`. A FILE that holds `{"kind": "group", …}` (group-schema.ts)
 * stands for all its policies.
 */
import { dirname, join, resolve } from 'node:path';
import { InputError } from '../errors.js';
import { groupSchema, type GroupMemberEntry } from './group-schema.js';
import { zodInputError } from './issues.js';
import { readDefinitionFile, type DefinitionFile } from './read-file.js';

export interface GroupOption {
  readonly name: string;
  readonly files: readonly string[];
}

const NAME = /^[^=,\s][^=,]*$/;

/** Splits one `--group` value; the name is what the report calls the training method. */
export function parseGroupOption(value: string): GroupOption {
  const at = value.indexOf('=');
  const name = at < 0 ? '' : value.slice(0, at).trim();
  const files = at < 0 ? [] : value.slice(at + 1).split(',').map((f) => f.trim());
  if (!NAME.test(name) || files.length === 0 || files.some((f) => f === '')) {
    throw new InputError('--group', `expected NAME=FILE[,FILE…], e.g. --group tuned=seed-1.json,seed-2.json or --group tuned=tuned-group.json (got "${value}")`);
  }
  return { name, files };
}

/** True for JSON that declares itself a group file. */
export function isGroupJson(json: unknown): boolean {
  return json !== null && typeof json === 'object' && !Array.isArray(json) && (json as { kind?: unknown }).kind === 'group';
}

/**
 * Member definitions of a group file's JSON: paths resolve against the group file's folder
 * (`baseDir`) and are labelled as seen from where the user stands; inline members are
 * labelled `FILE#policies[i]`.
 */
export function groupMembers(json: unknown, label: string, baseDir: string): DefinitionFile[] {
  const parsed = groupSchema.safeParse(json);
  if (!parsed.success) throw zodInputError(parsed.error, json, label);
  return parsed.data.policies.map((entry: GroupMemberEntry, i) => {
    if (typeof entry === 'string' || !('kind' in entry)) {
      const path = typeof entry === 'string' ? entry : entry.path;
      return readDefinitionFile(resolve(baseDir, path), join(dirname(label), path));
    }
    return { json: entry, source: { label: `${label}#policies[${i}]`, baseDir } };
  });
}

/** Every member of one `--group`, read from its files (a group file counts for all its members). */
export function readGroupOption(option: GroupOption): DefinitionFile[] {
  const members: DefinitionFile[] = [];
  for (const file of option.files) {
    const read = readDefinitionFile(file);
    if (isGroupJson(read.json)) members.push(...groupMembers(read.json, file, read.source.baseDir));
    else members.push(read);
  }
  if (members.length < 2) {
    throw new InputError(`--group ${option.name}`, `needs at least 2 policies, one a training seed (got ${members.length}); list them as NAME=FILE,FILE or in a group file`);
  }
  return members;
}
