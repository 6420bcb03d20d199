import { parseCommandArgs, required } from '../args.js';
import { parseOption } from '../../options/parse-option.js';
import { parseOffPolicyOption } from '../../options/offpolicy-options.js';
import { ESTIMATORS } from '../../offpolicy/evaluate-log.js';
import { runStoredOffPolicy } from '../../offpolicy/stored-offpolicy.js';
import { offPolicyText } from '../../report/offpolicy-text.js';
import { DEFAULT_RESAMPLES } from '../../stats/bootstrap-resample.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { annotationRecord, storedAnnotations } from '../annotate.js';
import { annotationsJson } from '../../report/run-json.js';
import { version } from '../version.js';

export const HELP = `reckon offpolicy: the return a target policy would get, estimated from episodes logged under another

Reads a log of episodes (JSON Lines, one step a line, with the behaviour policy's probability
of each logged action; see the README, "Evaluating from logged episodes") and reweights it by
importance sampling. Prints every estimator side by side, approximate bootstrap intervals,
lower bounds that hold at any number of episodes, and diagnostics (effective sample size,
weight statistics, support), always.

Usage: reckon offpolicy --log FILE.jsonl --policy TARGET.json [--env ENV.json] [options]

Options:
  --log FILE          the logged episodes
  --policy FILE       the target policy (uniform, table, epsilon, arrows, or module with
                      probabilities(state)); the log's states are matched to it by name
  --env FILE          the environment the log came from (optional): supplies the discount,
                      horizon and reward bounds a log without a header lacks, and checks that
                      every logged state and action exists there
  --behaviour FILE    the behaviour policy, when known (needs a gridworld or tabular --env):
                      every logged probability is checked against it, and the largest
                      possible weight gives a two-sided betting interval; without it, a
                      log's behaviour_probs give that weight too when they cover every state
                      the behaviour can reach on --env
  --estimator LIST    ${ESTIMATORS.join(', ')} or all (default all), comma-separated
  --confidence L      confidence level (default 0.95)
  --resamples B       bootstrap resamples (default ${DEFAULT_RESAMPLES})
  --folds K           cross-fitting folds of the doubly robust model (default 5)
  --seed S            seed of the bootstrap and the held-out split (default 1)
  --json              print one JSON object instead of the report
  --store PATH        the run store (default: $RECKON_STORE, else
                      ~/.local/share/reckon/runs.sqlite); 'reckon runs show ID' prints it again
  --no-store          do not keep this run
  --label KEY=VALUE   label the stored run (repeatable), for 'runs list --label'
  --note TEXT         a note kept with the stored run
  -h, --help          this help

Examples:
  reckon estimate --env envs/warehouse.json --policy envs/picker-direct-eps.json --episodes 2000 --seed 3 --record direct.jsonl
  reckon offpolicy --log direct.jsonl --policy envs/picker-careful.json --env envs/warehouse.json
  reckon offpolicy --log direct.jsonl --policy envs/picker-careful.json --estimator wis,wdr --json
`;

const OPTIONS = {
  log: { type: 'string' },
  policy: { type: 'string' },
  env: { type: 'string' },
  behaviour: { type: 'string' },
  estimator: { type: 'string' },
  confidence: { type: 'string' },
  resamples: { type: 'string' },
  folds: { type: 'string' },
  seed: { type: 'string' },
  json: { type: 'boolean' },
  store: { type: 'string' },
  'no-store': { type: 'boolean' },
  label: { type: 'string', multiple: true },
  note: { type: 'string' },
} as const;

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('offpolicy', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const logPath = required('offpolicy', 'log', values.log, '--log episodes.jsonl');
  const policyPath = required('offpolicy', 'policy', values.policy, '--policy envs/picker-careful.json');
  const seed = values.seed === undefined ? 1 : parseOption('seed', 'seed', values.seed);
  const annotations = storedAnnotations(values);
  const request = {
    logPath,
    policyPath,
    envPath: values.env ?? null,
    behaviourPath: values.behaviour ?? null,
    estimators: values.estimator === undefined ? [...ESTIMATORS] : parseOffPolicyOption('estimator', values.estimator),
    level: values.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', values.confidence),
    seed,
    resamples: values.resamples === undefined ? DEFAULT_RESAMPLES : parseOffPolicyOption('resamples', values.resamples),
    folds: values.folds === undefined ? 5 : parseOffPolicyOption('folds', values.folds),
  };
  const storePath = values['no-store'] ? null : (values.store ?? defaultStorePath());
  const db = storePath === null ? null : openStore(storePath);
  let stored;
  try {
    stored = await runStoredOffPolicy(db, request, { toolVersion: version(), annotations });
  } finally {
    db?.close();
  }
  const { json, runId } = stored;
  if (values.json) process.stdout.write(`${JSON.stringify({ ...json, run_id: runId, ...annotationsJson(annotationRecord(annotations)) }, null, 2)}\n`);
  else {
    process.stdout.write(offPolicyText(json));
    if (runId) process.stdout.write(`\n  Stored as run ${runId} in ${storePath}.\n`);
  }
  return 0;
}
