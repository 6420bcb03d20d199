import { parseGroupOption, readDefinitionFile, readGroupOption, type DefinitionFile } from '../../definitions/index.js';
import type { PolicyGroup } from '../../stats/groups/index.js';
import { InputError, StoppedEarly } from '../../errors.js';
import { runComparison, type CompareRequest, type ComparisonResult } from '../../evaluate/compare.js';
import { differenceMethod } from '../../options/difference-method.js';
import { runStoredComparison } from '../../evaluate/stored-compare.js';
import { compareJson } from '../../report/compare-json.js';
import { compareText } from '../../report/compare-text.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { riskRequestFrom } from '../../options/risk-options.js';
import { parseCommandArgs, required } from '../args.js';
import { runSize } from '../../options/run-size.js';
import { parseRunOptions } from '../../options/run-options.js';
import { noiseMode } from '../../options/noise-option.js';
import { ProgressLine } from '../progress.js';
import { reportStoppedEarly, StopSignals } from '../stop-signals.js';
import { version } from '../version.js';
import { annotationRecord, storedAnnotations } from '../annotate.js';
import { annotationsJson } from '../../report/run-json.js';
import { count } from '../../report/format.js';

export const HELP = `reckon compare: is one policy really better than another, and by how much?

Runs every policy on the same episodes with the same environment noise (common random
numbers) and reports each policy's expected return, and for every pair the paired
difference (first minus second) with its interval, p-value, the correlation of the paired
returns, how many times cheaper pairing made the comparison, and the probability that the
first policy returns more than the second. With three or more policies the p-values are
Holm-adjusted and the policies ranked.

With --group NAME=FILE,FILE,... (repeatable) the policies are the members of a training
method, one a training seed: reckon reports each group's mean over its seeds with an interval
that counts both the seed variability and the episode noise, the variance split between
them, what would narrow the interval (more seeds or more episodes), and between groups the
difference of group means (Welch over seeds), the probability of improvement over members
and Holm-adjusted p-values.

Usage: reckon compare --env FILE --policy A --policy B [--policy C ...] [options]
       reckon compare --env FILE --group NAME=FILE,FILE[,...] [--group NAME=...] [--policy P] [options]

Options:
  --env FILE            environment definition
  --policy FILE         a policy definition; give two or more (or groups)
  --group NAME=FILES    a group of policies trained by one method with different seeds:
                        policy files separated by commas, or a group file
                        {"kind": "group", "policies": [FILE or policy, ...]}; at least 2
  --episodes N          episodes per policy (default 10000); with --target-error, the cap
  --target-error E      run until every difference's half-width is at most E, with intervals
                        that stay valid although the run stops on the data
  --max-episodes N      cap for --target-error (default 10,000,000)
  --seed S              seed (default: random, printed)
  --confidence L        two-sided level (default 0.95)
  --ci METHOD           difference intervals: t (paired t, default), bootstrap (BCa of the
                        paired differences), bootstrap-percentile; with --target-error:
                        betting (default when bounds are known, bets aimed at the target),
                        empirical-bernstein, normal-mixture, chow-robbins (asymptotic)
  --bounds LOW,HIGH     bounds on every return, when the environment cannot give them
  --sigma S             one return's sub-Gaussian scale, for normal-mixture
  --iqm                 also the interquartile mean of each policy (stratified bootstrap)
  --risk                also each policy's risk figures (as for estimate: --quantiles, --tail,
                        --event) and their paired differences, with a line when the policy
                        with the better mean has the worse tail
  --start STATE         start every episode in STATE
  --noise MODE          how the random draws are keyed: step (the draw of step t of episode
                        i, default) or visit (the draw of the k-th visit of state s: close
                        policies see the same noise in the same states; gridworld and tabular
                        environments only). 'estimate --noise MODE' gives each policy's figures
  --workers K           worker threads (default: all cores)
  --store PATH | --no-store
  --label KEY=VALUE     label the stored comparison (repeatable), for 'runs list --label'
  --note TEXT           a note kept with the stored comparison
  --step-timeout SECONDS
                        how long one call into a code environment or policy may take
                        before the run fails, naming the episode and step (default 10)
  --json                one JSON object: policies[{name, mean, std, ci, episodes}],
                        differences[{a, b, mean, low, high, p_value, correlation,
                        variance_reduction, ...}] with a, b indices into policies; with
                        --group also groups[{name, members, mean, ci, iqm, variance,
                        uncertainty, advice, ...}] and group_differences[{a, b, mean, low,
                        high, p_value, adjusted_p_value, probability_of_improvement}]

Examples:
  reckon compare --env envs/warehouse.json --policy envs/picker-direct.json --policy envs/picker-careful.json --seed 1
  reckon compare --env envs/warehouse.json --policy envs/picker-direct.json --policy envs/picker-direct-eps.json --target-error 0.05
  reckon compare --env envs/restock-env.json --policy envs/restock-base-stock.json --policy envs/restock-fixed.json --iqm
  reckon compare --env envs/warehouse.json --group shortcut=envs/seeds/shortcut-trainer.json --group detour=envs/seeds/detour-trainer.json --episodes 2000 --seed 1
`;

const OPTIONS = {
  env: { type: 'string' },
  policy: { type: 'string', multiple: true },
  group: { type: 'string', multiple: true },
  episodes: { type: 'string' },
  'target-error': { type: 'string' },
  'max-episodes': { type: 'string' },
  seed: { type: 'string' },
  confidence: { type: 'string' },
  ci: { type: 'string' },
  bounds: { type: 'string' },
  sigma: { type: 'string' },
  iqm: { type: 'boolean' },
  risk: { type: 'boolean' },
  quantiles: { type: 'string' },
  tail: { type: 'string' },
  event: { type: 'string', multiple: true },
  start: { type: 'string' },
  workers: { type: 'string' },
  store: { type: 'string' },
  'no-store': { type: 'boolean' },
  json: { type: 'boolean' },
  'step-timeout': { type: 'string' },
  noise: { type: 'string' },
  label: { type: 'string', multiple: true },
  note: { type: 'string' },
} as const;

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('compare', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const envPath = required('compare', 'env', values.env, '--env envs/warehouse.json');
  const plainPaths = (values.policy as string[] | undefined) ?? [];
  const groupOptions = ((values.group as string[] | undefined) ?? []).map(parseGroupOption);
  groupOptions.forEach((option, i) => {
    if (groupOptions.findIndex((o) => o.name === option.name) !== i) throw new InputError('--group', `the name "${option.name}" is given twice; give each group its own name`);
  });
  if (plainPaths.length < 2 && groupOptions.length === 0) {
    throw new InputError('--policy', `give at least two policies to compare (got ${plainPaths.length}), e.g. --policy envs/picker-direct.json --policy envs/picker-careful.json, or --group NAME=FILE,FILE`);
  }
  const { episodes, targetError } = runSize(values);
  const { seed, workers, level, bounds, sigma, start, stepTimeout } = parseRunOptions(values);
  const { method, sequence } = differenceMethod(values.ci, targetError);
  const annotations = storedAnnotations(values);

  const env = readDefinitionFile(envPath);
  const policyFiles: DefinitionFile[] = plainPaths.map((p) => readDefinitionFile(p));
  const groups: PolicyGroup[] = [];
  for (const option of groupOptions) {
    const members = readGroupOption(option);
    groups.push({ name: option.name, members: members.map((_, i) => policyFiles.length + i) });
    policyFiles.push(...members);
  }
  if (policyFiles.length < 2) throw new InputError('--policy', 'a group alone is one method: add another --group or a --policy to compare it with');
  const policyPaths = policyFiles.map((f) => f.source.label);
  const request: CompareRequest = {
    env,
    policies: policyFiles,
    groups: groups.length > 0 ? groups : null,
    seed,
    start,
    noise: noiseMode(values.noise, 'compare', env.json),
    episodes,
    workers,
    method,
    sequence,
    level,
    bounds,
    sigma,
    targetError,
    interquartileMean: Boolean(values.iqm),
    risk: riskRequestFrom(values),
    stepTimeout,
  };
  const storePath = values['no-store'] ? null : (values.store ?? defaultStorePath());
  const db = storePath === null ? null : openStore(storePath);
  const progress = new ProgressLine();
  const stop = new StopSignals();
  let result: ComparisonResult;
  let runId: string | null = null;
  let memberIds: string[] | null = null;
  try {
    const withProgress: CompareRequest = {
      ...request,
      signal: stop.signal,
      onProgress: (p) => progress.update({ ...p, mean: Number.NaN }),
      onAnalysis: (step, done, total) => progress.analysis(step, done, total),
    };
    if (db) {
      const stored = await runStoredComparison(db, withProgress, version(), { annotations });
      result = stored.result;
      runId = stored.runId;
      memberIds = stored.memberIds;
    } else {
      result = await runComparison(withProgress);
    }
  } catch (e) {
    if (!(e instanceof StoppedEarly)) throw e;
    progress.clear();
    return reportStoppedEarly(e, stop, (id) => `reckon runs resume ${id}${values.store ? ` --store ${storePath}` : ''}`);
  } finally {
    progress.clear();
    stop.dispose();
    db?.close();
  }
  const labels = { env: envPath, policies: policyPaths };
  if (values.json) {
    process.stdout.write(`${JSON.stringify({ ...compareJson(result, labels, version(), runId, memberIds), ...annotationsJson(annotationRecord(annotations)) }, null, 2)}\n`);
  } else {
    process.stdout.write(compareText(result, labels));
    if (runId) process.stdout.write(`  Stored as run ${runId} in ${storePath}.\n`);
    if (values.seed === undefined) process.stdout.write(`  (seed ${seed} was chosen at random; add --seed ${seed} to repeat this comparison exactly)\n`);
  }
  if (result.target && !result.target.reached) {
    process.stderr.write(`reckon: the target ±${targetError} was not reached on every difference within ${result.episodes} episodes; raise --max-episodes or accept a wider target\n`);
  }
  if (result.interrupted) {
    const kept = runId ? ` Its ${result.episodes} paired episodes are kept as run ${runId}; 'reckon runs show ${runId}' reports them, and 'reckon runs resume ${runId}${values.store ? ` --store ${storePath}` : ''}' continues it.` : '';
    process.stderr.write(`reckon: comparison interrupted${stop.received ? ` (${stop.received})` : ''} after ${count(result.episodes)} episodes.${kept}\n`);
    return stop.exitCode();
  }
  return 0;
}
