import { InputError } from '../../errors.js';
import { labelKeySchema, parseLabels, parseNote } from '../../options/annotation-options.js';
import { addNote, removeLabels, setLabels } from '../../store/annotations.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { getRun } from '../../store/runs.js';
import { annotationsJson } from '../../report/run-json.js';
import { parseCommandArgs } from '../args.js';

/** `runs label ID KEY=VALUE… [--remove KEY]`: labels on a stored run, set or changed later. */
export function label(args: string[], help: string): number {
  const { values, positionals } = parseCommandArgs('runs', args, { store: { type: 'string' }, json: { type: 'boolean' }, remove: { type: 'string', multiple: true } }, true);
  if (values.help) {
    process.stdout.write(help);
    return 0;
  }
  const [id, ...pairs] = positionals;
  if (id === undefined) throw new InputError('runs label', "needs a run id and KEY=VALUE labels, e.g. 'reckon runs label k3x9p2ab reported=yes'");
  const removing = values.remove ?? [];
  if (pairs.length === 0 && removing.length === 0) throw new InputError('runs label', `needs KEY=VALUE labels to set (or --remove KEY), e.g. 'reckon runs label ${id} reported=yes'`);
  const labels = parseLabels('runs label', pairs);
  for (const key of removing) {
    const result = labelKeySchema.safeParse(key);
    if (!result.success) throw new InputError('--remove', `${result.error.issues[0]?.message} (got "${key}")`);
  }
  const storeLabel = values.store ?? defaultStorePath();
  const db = openStore(storeLabel, { readonly: true });
  try {
    getRun(db, id, storeLabel);
    db.transaction(() => {
      removeLabels(db, id, removing);
      setLabels(db, id, labels);
    })();
    const run = getRun(db, id, storeLabel);
    if (values.json) process.stdout.write(`${JSON.stringify({ run_id: id, ...annotationsJson(run) }, null, 2)}\n`);
    else process.stdout.write(`Run ${id} labels: ${labelsText(run.labels) || '(none)'}\n`);
  } finally {
    db.close();
  }
  return 0;
}

/** `runs note ID TEXT`: a note added to a stored run (notes are kept in order, never replaced). */
export function note(args: string[], help: string): number {
  const { values, positionals } = parseCommandArgs('runs', args, { store: { type: 'string' }, json: { type: 'boolean' } }, true);
  if (values.help) {
    process.stdout.write(help);
    return 0;
  }
  const [id, ...words] = positionals;
  if (id === undefined || words.length === 0) throw new InputError('runs note', "needs a run id and the note's text, e.g. 'reckon runs note k3x9p2ab \"the figure in the report\"'");
  const text = parseNote('runs note', words.join(' '))!;
  const storeLabel = values.store ?? defaultStorePath();
  const db = openStore(storeLabel, { readonly: true });
  try {
    getRun(db, id, storeLabel);
    addNote(db, id, text);
    const run = getRun(db, id, storeLabel);
    if (values.json) process.stdout.write(`${JSON.stringify({ run_id: id, ...annotationsJson(run) }, null, 2)}\n`);
    else process.stdout.write(`Run ${id}: note added (${run.notes.length} in all).\n`);
  } finally {
    db.close();
  }
  return 0;
}

/** `key=value, key=value`, keys in order. */
export function labelsText(labels: Readonly<Record<string, string>>): string {
  return Object.entries(labels)
    .map(([k, v]) => `${k}=${v}`)
    .join(', ');
}
