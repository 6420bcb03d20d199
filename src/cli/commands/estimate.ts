import { randomInt } from 'node:crypto';
import { readDefinitionFile } from '../../definitions/index.js';
import { defaultWorkers } from '../../engine/pool.js';
import type { RolloutSpec } from '../../engine/spec.js';
import { runEstimate } from '../../evaluate/estimate.js';
import { estimateJson } from '../../report/estimate-json.js';
import { estimateText } from '../../report/estimate-text.js';
import { parseCommandArgs, required } from '../args.js';
import { parseOption } from '../options.js';
import { ProgressLine } from '../progress.js';
import { version } from '../version.js';

export const HELP = `reckon estimate: run seeded episodes and estimate the policy's expected discounted return

Usage: reckon estimate --env FILE --policy FILE [options]

Options:
  --env FILE            environment definition (gridworld, tabular or module)
  --policy FILE         policy definition (uniform, table, epsilon, arrows or module)
  --episodes N          episodes to run (default 10000)
  --seed S              seed; the result is a pure function of env, policy, seed and episodes
                        (default: a random seed, printed so the run can be repeated)
  --workers K           worker threads (default: all cores); never changes the result
  --start STATE         start every episode in STATE (e.g. "2,0"): the value of that state
  --confidence L        two-sided confidence level (default 0.95)
  --ci METHOD           t (default), normal, bootstrap (BCa), bootstrap-percentile,
                        hoeffding, bernstein (the last two need return bounds)
  --bounds LOW,HIGH     bounds on every return, when the environment cannot give them
  --target-error E      also project the episodes needed for a half-width of E
  --json                print one JSON object on stdout instead of the report
  --no-store            do not keep this run (accepted; runs are not stored yet)
  -h, --help            this help

Examples:
  reckon estimate --env envs/warehouse.json --policy envs/picker-direct.json --episodes 20000 --seed 7
  reckon estimate --env envs/warehouse.json --policy envs/picker-careful.json --ci bernstein --json
  reckon estimate --env envs/restock-env.json --policy envs/restock-base-stock.json --target-error 0.5
`;

const OPTIONS = {
  env: { type: 'string' },
  policy: { type: 'string' },
  episodes: { type: 'string' },
  seed: { type: 'string' },
  workers: { type: 'string' },
  start: { type: 'string' },
  confidence: { type: 'string' },
  ci: { type: 'string' },
  bounds: { type: 'string' },
  'target-error': { type: 'string' },
  json: { type: 'boolean' },
  'no-store': { type: 'boolean' },
} as const;

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('estimate', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const envPath = required('estimate', 'env', values.env, '--env envs/warehouse.json');
  const policyPath = required('estimate', 'policy', values.policy, '--policy envs/picker-direct.json');
  const episodes = values.episodes === undefined ? 10000 : parseOption('episodes', 'episodes', values.episodes);
  const seed = values.seed === undefined ? randomInt(0, 2 ** 31) : parseOption('seed', 'seed', values.seed);
  const workers = values.workers === undefined ? defaultWorkers() : parseOption('workers', 'workers', values.workers);
  const level = values.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', values.confidence);
  const method = values.ci === undefined ? 't' : parseOption('ci', 'ci', values.ci);
  const bounds = values.bounds === undefined ? null : parseOption('bounds', 'bounds', values.bounds);
  const targetError = values['target-error'] === undefined ? null : parseOption('target-error', 'targetError', values['target-error']);
  const start = values.start === undefined ? null : parseOption('start', 'start', values.start);

  const envFile = readDefinitionFile(envPath);
  const policyFile = readDefinitionFile(policyPath);
  const spec: RolloutSpec = { env: envFile, policy: policyFile, seed, start };

  const progress = new ProgressLine();
  const controller = new AbortController();
  const onSigint = () => controller.abort();
  process.once('SIGINT', onSigint);
  let result;
  try {
    result = await runEstimate({
      spec,
      episodes,
      workers,
      method,
      level,
      bounds,
      targetError,
      signal: controller.signal,
      onProgress: (p) => progress.update(p),
    });
  } finally {
    progress.clear();
    process.off('SIGINT', onSigint);
  }
  const labels = { env: envPath, policy: policyPath };
  if (values.json) {
    process.stdout.write(`${JSON.stringify(estimateJson(result, labels, version()), null, 2)}\n`);
  } else {
    process.stdout.write(estimateText(result, labels));
    if (values.seed === undefined) process.stdout.write(`\n  (seed ${seed} was chosen at random; add --seed ${seed} to repeat this run exactly)\n`);
  }
  return result.interrupted ? 130 : 0;
}
