import { InputError } from '../../errors.js';
import { differenceMethod } from '../../options/difference-method.js';
import { parseOption } from '../../options/parse-option.js';
import { compareStoredRuns } from '../../evaluate/runs-compare.js';
import { storeRunsComparison } from '../../evaluate/runs-compare-store.js';
import { runsCompareJson, runsCompareText } from '../../report/runs-compare-report.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { getRun } from '../../store/runs.js';
import { parseCommandArgs } from '../args.js';
import { annotationsFrom } from '../../options/annotation-options.js';
import { version } from '../version.js';

/**
 * `runs compare ID ID [ID…]`: stored estimate runs compared without running an episode,
 * paired when they ran on common random numbers, else by Welch's interval.
 */
export function compareRuns(args: string[], help: string): number {
  const { values, positionals } = parseCommandArgs(
    'runs',
    args,
    {
      store: { type: 'string' },
      json: { type: 'boolean' },
      ci: { type: 'string' },
      confidence: { type: 'string' },
      iqm: { type: 'boolean' },
      'allow-env-change': { type: 'boolean' },
      'store-result': { type: 'boolean' },
      label: { type: 'string', multiple: true },
      note: { type: 'string' },
    },
    true,
  );
  if (values.help) {
    process.stdout.write(help);
    return 0;
  }
  if (positionals.length < 2) throw new InputError('runs compare', `needs two or more run ids (got ${positionals.length}), e.g. 'reckon runs compare k3x9p2ab m7wq4ctz'; see the ids with 'reckon runs list'`);
  if (values.ci !== undefined && !['t', 'bootstrap', 'bootstrap-percentile'].includes(values.ci)) {
    throw new InputError('--ci', `must be t, bootstrap or bootstrap-percentile for the paired differences (got "${values.ci}"); unpaired runs always get Welch's interval`);
  }
  const { method } = differenceMethod(values.ci, null);
  const level = values.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', values.confidence);
  const annotations = annotationsFrom(values);
  if (!values['store-result'] && (Object.keys(annotations.labels).length > 0 || annotations.note !== null)) {
    throw new InputError(values.note !== undefined ? '--note' : '--label', 'labels and notes go on a stored result: add --store-result');
  }
  const options = { method, level, interquartileMean: values.iqm === true, allowEnvChange: values['allow-env-change'] === true };
  const storeLabel = values.store ?? defaultStorePath();
  const db = openStore(storeLabel, { readonly: true });
  try {
    const runs = positionals.map((id) => getRun(db, id, storeLabel));
    const comparison = compareStoredRuns(db, runs, options);
    const storedId = values['store-result'] ? storeRunsComparison(db, comparison, options, version(), annotations) : null;
    if (values.json) {
      process.stdout.write(`${JSON.stringify(runsCompareJson(comparison, version(), storedId), null, 2)}\n`);
    } else {
      process.stdout.write(runsCompareText(comparison));
      if (storedId) process.stdout.write(`  Stored as comparison run ${storedId} in ${storeLabel} ('reckon runs show ${storedId}', or its page in 'reckon serve').\n`);
    }
  } finally {
    db.close();
  }
  return 0;
}
