import { readDefinitionFile } from '../../definitions/index.js';
import type { RolloutSpec } from '../../engine/spec.js';
import { runEstimate, type EstimateResult } from '../../evaluate/estimate.js';
import { runStoredEstimate } from '../../evaluate/stored-estimate.js';
import { InputError, StoppedEarly } from '../../errors.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { parseShard, shardInfo, shardRange } from '../shard.js';
import { estimateJson } from '../../report/estimate-json.js';
import { estimateText } from '../../report/estimate-text.js';
import { parseCommandArgs, required } from '../args.js';
import { parseEvent, riskRequestFrom } from '../../options/risk-options.js';
import { parseOption } from '../../options/parse-option.js';
import { runSize } from '../../options/run-size.js';
import { parseRunOptions } from '../../options/run-options.js';
import { noiseMode } from '../../options/noise-option.js';
import { ProgressLine } from '../progress.js';
import { reportStoppedEarly, StopSignals } from '../stop-signals.js';
import { version } from '../version.js';
import { prepareRecorder } from '../../evaluate/record-log.js';
import { annotationRecord, storedAnnotations } from '../annotate.js';
import { annotationsJson } from '../../report/run-json.js';
import { count } from '../../report/format.js';

export const HELP = `reckon estimate: run seeded episodes and estimate the policy's expected discounted return

Usage: reckon estimate --env FILE --policy FILE [options]

Options:
  --env FILE            environment definition (gridworld, tabular or module)
  --policy FILE         policy definition (uniform, table, epsilon, arrows or module)
  --episodes N          episodes to run (default 10000); with --target-error, the most to run
                        (default 10,000,000; --max-episodes says the same)
  --seed S              seed; the result is a pure function of env, policy, seed and episodes
                        (default: a random seed, printed so the run can be repeated)
  --workers K           worker threads (default: all cores); never changes the result
  --start STATE         start every episode in STATE (e.g. "2,0"): the value of that state
  --noise MODE          how the random draws are keyed: step (default; the draw of step t
                        of episode i) or visit (the draw of the k-th visit of state s in
                        episode i: what 'compare --noise visit' gives each policy; gridworld
                        and tabular environments only)
  --confidence L        two-sided confidence level (default 0.95)
  --ci METHOD           t (default), normal, bootstrap (BCa), bootstrap-percentile,
                        hoeffding, bernstein, betting (the last three need return bounds;
                        betting tunes its bets to --episodes and stays valid at every n);
                        with --target-error: betting (default when bounds are known, bets
                        aimed at the target), empirical-bernstein, normal-mixture (needs
                        --sigma or bounds), chow-robbins (asymptotic only)
  --bounds LOW,HIGH     bounds on every return, when the environment cannot give them
  --target-error E      run until the interval's half-width is at most E, with an interval
                        that stays valid although the run stops on the data
  --max-episodes N      cap for --target-error runs
  --sigma S             the returns' sub-Gaussian scale, for --ci normal-mixture
  --risk                also the return's quantiles, the mean of its worst --tail and the
                        probability of each --event, with intervals (JSON: "risk")
  --quantiles P,P,...   quantile levels for --risk (default 0.05,0.5,0.95)
  --tail A              the worst fraction whose mean --risk reports (default 0.05)
  --event E             an event to count, repeatable: return<X, return<=X, return>X,
                        return>=X, length>=K, length=K, or terminal=X (finite environments:
                        the episode ended in a cell with letter X or the state named X)
                        (implies --risk)
  --target-event E      with --target-error: run until the probability of an event
                        (e.g. 'return<0', 'terminal=X', 'length>=40') is known to ±E, on an
                        anytime-valid betting interval
  --json                print one JSON object on stdout instead of the report
  --step-timeout SECONDS
                        how long one call into a code environment or policy may take
                        before the run fails, naming the episode and step (default 10)
  --shard K/M           run only the K-th of M disjoint parts of this seeded run (one per
                        machine; 'reckon runs merge' joins them); auto/M reads K from
                        JOB_COMPLETION_INDEX or SLURM_ARRAY_TASK_ID
  --store PATH          the run store (default: $RECKON_STORE, else
                        ~/.local/share/reckon/runs.sqlite)
  --no-store            do not keep this run
  --label KEY=VALUE     label the stored run (repeatable), to find it again with
                        'reckon runs list --label KEY=VALUE'
  --note TEXT           a note kept with the stored run ('reckon runs show' prints it)
  --record FILE         also write the run's episodes as a log (JSON Lines, with the policy's
                        probabilities) for 'reckon offpolicy'; the policy must give its
                        probabilities (any built-in kind, or a module with probabilities)
  -h, --help            this help

Examples:
  reckon estimate --env envs/warehouse.json --policy envs/picker-direct.json --episodes 20000 --seed 7
  reckon estimate --env envs/warehouse.json --policy envs/picker-careful.json --ci bernstein --json
  reckon estimate --env envs/restock-env.json --policy envs/restock-base-stock.json --target-error 2
  reckon estimate --env envs/restock-env.json --policy envs/restock-base-stock.json --risk --event 'return<300'
  reckon estimate --env envs/loading-lane.json --policy envs/lane-explorer.json --risk --event 'terminal=X'
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
  'max-episodes': { type: 'string' },
  sigma: { type: 'string' },
  json: { type: 'boolean' },
  'no-store': { type: 'boolean' },
  store: { type: 'string' },
  shard: { type: 'string' },
  'step-timeout': { type: 'string' },
  noise: { type: 'string' },
  record: { type: 'string' },
  'target-event': { type: 'string' },
  risk: { type: 'boolean' },
  quantiles: { type: 'string' },
  tail: { type: 'string' },
  event: { type: 'string', multiple: true },
  label: { type: 'string', multiple: true },
  note: { type: 'string' },
} as const;

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('estimate', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const envPath = required('estimate', 'env', values.env, '--env envs/warehouse.json');
  const policyPath = required('estimate', 'policy', values.policy, '--policy envs/picker-direct.json');
  const { episodes, targetError } = runSize(values);
  const { seed, workers, level, bounds, sigma, start, stepTimeout } = parseRunOptions(values);
  const method = values.ci === undefined ? null : parseOption('ci', 'interval', values.ci);
  const risk = riskRequestFrom(values);
  const annotations = storedAnnotations(values);
  const targetEvent = values['target-event'] === undefined ? null : parseEvent(values['target-event']);
  if (targetEvent && targetError === null) throw new InputError('--target-event', "needs --target-error E: the half-width to reach on the event's probability, e.g. --target-error 0.001");

  const shard = values.shard === undefined ? null : parseShard(values.shard);
  if (shard && targetError !== null) {
    throw new InputError('--shard', 'cannot split a --target-error run: where it stops depends on all its episodes in order; shard a run of fixed --episodes instead');
  }
  const range = shard ? shardRange(shard, episodes) : { first: 0, count: episodes };
  if (range.count < 2) throw new InputError('--shard', `leaves ${range.count} episode(s) for shard ${shard?.index}; give more --episodes or fewer shards`);

  if (values.record !== undefined && values.noise === 'visit') {
    throw new InputError('--record', 'replays step-keyed draws only: leave out --noise visit to record the run');
  }
  const envFile = readDefinitionFile(envPath);
  const policyFile = readDefinitionFile(policyPath);
  const spec: RolloutSpec = { env: envFile, policy: policyFile, seed, start, noise: noiseMode(values.noise, 'estimate', envFile.json) };
  const recorder = values.record === undefined ? null : await prepareRecorder(values.record, spec, { env: envPath, policy: policyPath }, stepTimeout);
  const storePath = values['no-store'] ? null : (values.store ?? defaultStorePath());
  const db = storePath === null ? null : openStore(storePath);

  const progress = new ProgressLine();
  const stop = new StopSignals();
  let result: EstimateResult;
  let runId: string | null = null;
  try {
    const options = { episodes: range.count, method, level, bounds, targetError, sigma, workers, stepTimeout, targetEvent: targetEvent?.text ?? null };
    if (db) {
      const stored = await runStoredEstimate({
        db,
        spec,
        options,
        toolVersion: version(),
        shard: shard ? shardInfo(shard, episodes) : null,
        first: range.first,
        signal: stop.signal,
        onProgress: (p) => progress.update(p),
        onAnalysis: (step, done, total) => progress.analysis(step, done, total),
        risk,
        annotations,
      });
      result = stored.result;
      runId = stored.runId;
    } else {
      result = await runEstimate({
        spec,
        ...options,
        first: range.first,
        signal: stop.signal,
        onProgress: (p) => progress.update(p),
        onAnalysis: (step, done, total) => progress.analysis(step, done, total),
        risk,
        targetEvent,
      });
    }
  } catch (e) {
    await recorder?.close();
    if (!(e instanceof StoppedEarly)) throw e;
    progress.clear();
    return reportStoppedEarly(e, stop, (id) => `reckon runs resume ${id}${values.store ? ` --store ${storePath}` : ''}`);
  } finally {
    progress.clear();
    stop.dispose();
    db?.close();
  }
  const labels = { env: envPath, policy: policyPath };
  if (recorder) {
    try {
      if (!result.interrupted) await recorder.write(range.first, result.episodes);
    } finally {
      await recorder.close();
    }
  }
  if (values.json) {
    process.stdout.write(`${JSON.stringify({ ...estimateJson(result, labels, version(), runId), ...annotationsJson(annotationRecord(annotations)) }, null, 2)}\n`);
  } else {
    process.stdout.write(estimateText(result, labels));
    if (runId) process.stdout.write(`\n  Stored as run ${runId} in ${storePath}${shard ? ` (shard ${shard.index}/${shard.count})` : ''}.\n`);
    if (values.seed === undefined) process.stdout.write(`  (seed ${seed} was chosen at random; add --seed ${seed} to repeat this run exactly)\n`);
  }
  if (result.target && !result.target.reached) {
    process.stderr.write(
      `reckon: the target half-width ${targetError} was not reached within ${result.episodes} episodes (reached ±${(result.targetEvent?.interval.halfWidth ?? result.ci.halfWidth).toPrecision(3)}); raise --max-episodes or accept a wider target\n`,
    );
  }
  if (result.interrupted) {
    const how = runId ? ` Continue it with: reckon runs resume ${runId}${values.store ? ` --store ${storePath}` : ''}` : '';
    process.stderr.write(`reckon: interrupted${stop.received ? ` (${stop.received})` : ''} after ${count(result.episodes)} of ${count(range.count)} episodes, all kept.${how}\n`);
    return stop.exitCode();
  }
  return 0;
}
