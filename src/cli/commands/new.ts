import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError } from '../../errors.js';
import { parseCommandArgs } from '../args.js';
import { environmentStarter, policyStarter } from '../starters.js';

export const HELP = `reckon new: write a commented starter module and its definition file

Usage: reckon new env NAME [--ts] [--dir DIR] [--force] [--json]
       reckon new policy NAME [--ts] [--dir DIR] [--force] [--json]

\`new env\` writes NAME.js (a code environment: a ski lift's queue, with Poisson arrivals and
binomial boarding), NAME.json (its definition) and NAME-uniform.json (a uniform random policy
to try it with). \`new policy\` writes NAME.js (a code policy: random choice with weights by
action name, for any environment) and NAME.json. With --ts the module is TypeScript (NAME.ts,
typed against reckon's plug-in interface); reckon runs it with no build step. Files are written
into DIR (default: the current folder); existing files are kept unless --force.

Examples:
  reckon new env lift-queue
  reckon check --env lift-queue.json
  reckon estimate --env lift-queue.json --policy lift-queue-uniform.json --seed 1
  reckon new policy busy-days --ts
  reckon estimate --env lift-queue.json --policy busy-days.json --seed 1
`;

const OPTIONS = { ts: { type: 'boolean' }, dir: { type: 'string' }, force: { type: 'boolean' }, json: { type: 'boolean' } } as const;
const KINDS = ['env', 'policy'] as const;
const NAME = /^[A-Za-z][A-Za-z0-9_-]{0,63}$/;

/** reckon's own src/plugin.ts, whose types a TypeScript starter imports. */
const PLUGIN_SOURCE = fileURLToPath(new URL('../../../src/plugin.ts', import.meta.url));

export async function run(args: string[]): Promise<number> {
  const { values, positionals } = parseCommandArgs('new', args, OPTIONS, true);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const [kind, name, ...extra] = positionals;
  if (!KINDS.includes(kind as (typeof KINDS)[number])) {
    throw new InputError('', `${kind === undefined ? 'say what to write' : `unknown kind "${kind}"`}: reckon new env NAME or reckon new policy NAME (see 'reckon new --help')`);
  }
  if (name === undefined || !NAME.test(name)) {
    throw new InputError('NAME', `${name === undefined ? 'is required' : `"${name}" is not a usable name`}: letters, digits, - and _, starting with a letter; e.g. reckon new ${kind} lift-queue`);
  }
  if (extra.length > 0) throw new InputError('', `unexpected argument "${extra[0]}" (see 'reckon new --help')`);

  const dir = path.resolve(values.dir ?? '.');
  const typescript = values.ts === true;
  const moduleFile = `${name}.${typescript ? 'ts' : 'js'}`;
  const starter = { name, typescript, pluginImport: importPath(dir) };
  const files: [string, string][] =
    kind === 'env'
      ? [
          [moduleFile, environmentStarter(starter)],
          [`${name}.json`, definition(moduleFile, {})],
          [`${name}-uniform.json`, `${JSON.stringify({ kind: 'uniform' })}\n`],
        ]
      : [
          [moduleFile, policyStarter(starter)],
          [`${name}.json`, definition(moduleFile, { weights: {} })],
        ];
  if (!values.force) {
    const taken = files.map(([f]) => f).find((f) => existsSync(path.join(dir, f)));
    if (taken) throw new InputError(path.join(values.dir ?? '.', taken), 'already exists; choose another NAME, or give --force to overwrite');
  }
  mkdirSync(dir, { recursive: true });
  for (const [file, text] of files) writeFileSync(path.join(dir, file), text);

  const shown = (f: string) => (values.dir ? path.join(values.dir, f) : f);
  const next =
    kind === 'env'
      ? [`reckon check --env ${shown(`${name}.json`)}`, `reckon estimate --env ${shown(`${name}.json`)} --policy ${shown(`${name}-uniform.json`)} --seed 1`]
      : [`reckon check --env ENV.json --policy ${shown(`${name}.json`)}`, `reckon estimate --env ENV.json --policy ${shown(`${name}.json`)} --seed 1`];
  if (values.json) {
    process.stdout.write(`${JSON.stringify({ kind, files: files.map(([f]) => shown(f)), next }, null, 2)}\n`);
    return 0;
  }
  const lines = [`wrote ${files.map(([f]) => shown(f)).join(', ')}`, '', 'Next:', ...next.map((c) => `  ${c}`)];
  lines.push('', `Then edit ${shown(moduleFile)}: its comments say what each part does. Use only the rng it is handed.`);
  process.stdout.write(`${lines.join('\n')}\n`);
  return 0;
}

function definition(modulePath: string, options: Record<string, unknown>): string {
  return `${JSON.stringify({ kind: 'module', path: `./${modulePath}`, options }, null, 2)}\n`;
}

/** src/plugin.ts as a relative import from `dir`, written with .js as TypeScript expects. */
function importPath(dir: string): string {
  let relative = path.relative(dir, PLUGIN_SOURCE).split(path.sep).join('/').replace(/\.ts$/, '.js');
  if (!relative.startsWith('.')) relative = `./${relative}`;
  return relative;
}
