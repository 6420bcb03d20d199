import { readDefinitionFile } from '../../definitions/index.js';
import { InputError } from '../../errors.js';
import { runPilot, type PilotResult } from '../../evaluate/pilot.js';
import { columns, count, duration, rate as formatRate, sig } from '../../report/format.js';
import { comparePolicies, pairedSampleSize, planEpisodes, summarize, tInterval } from '../../stats/index.js';
import { projectedAnalysisSeconds } from '../../evaluate/figures.js';
import { pairingGain } from '../../stats/pairing-gain.js';
import { parseCommandArgs, required } from '../args.js';
import { parseOption } from '../../options/parse-option.js';
import { parseRunOptions } from '../../options/run-options.js';
import { noiseMode } from '../../options/noise-option.js';
import { NOISE_WORDS } from '../../report/noise-words.js';
import { parseGroupOption } from '../../definitions/index.js';
import { groupPlanText, planGroups } from './plan-groups.js';

export const HELP = `reckon plan: how many episodes, and how long, before running them

Runs a short pilot (a few seconds, or --pilot N episodes), then projects the episodes and the
time on this machine that a target half-width E needs: with a fixed-n Student-t run
(episodes_needed), with a run that stops when it reaches E ('estimate --target-error', whose
interval stays valid at that data-dependent stop: episodes_needed_sequential), and with
Hoeffding's distribution-free bound when return bounds are known. With two policies and
--difference D it plans a comparison instead: the paired episodes that detect a true
difference D with the given power.

Usage:
  reckon plan --env FILE --policy FILE --target-error E [options]
  reckon plan --env FILE --policy A --policy B --difference D [--power P] [options]
  reckon plan --env FILE --group NAME=FILES [--group ...] [--seed-cost T]
              (--target-error E | --difference D) [options]

With --group (policies of one training method, one a seed, as for 'compare --group') it
pilots every member and splits the variability between seeds and episodes; with the cost of
training one more seed (--seed-cost) it gives the episodes a member that spend a budget best,
and the seeds that reach a half-width E of the group mean or detect a difference D between
methods with the given power.

Options:
  --target-error E      the half-width to reach
  --difference D        the smallest true difference worth detecting (two policies)
  --power P             chance of detecting it (default 0.8)
  --group NAME=FILES    a training method's policies, one a seed (files, or a group file)
  --seed-cost T         what training one more seed costs: 90s, 30m, 2h, 1.5d (with --group)
  --episodes N          episodes a member to plan at without --seed-cost (default 10000)
  --pilot N             pilot episodes (default: adaptive, about 2 seconds)
  --confidence L        two-sided level (default 0.95)
  --bounds LOW,HIGH     bounds on every return, when the environment cannot give them
  --sigma S             the returns' sub-Gaussian scale for the normal-mixture sequence
  --seed S              pilot seed (default: random)
  --workers K           worker threads the real run will use (default: all cores)
  --noise MODE          step or visit, as the real run will use (default: estimate's for one
                        policy, compare's for two)
  --json                one JSON object

Examples:
  reckon plan --env envs/warehouse.json --policy envs/picker-direct.json --target-error 0.01
  reckon plan --env envs/warehouse.json --policy envs/picker-direct.json --policy envs/picker-direct-eps.json --difference 0.05
  reckon plan --env envs/warehouse.json --group shortcut=envs/seeds/shortcut-trainer.json --seed-cost 2h --target-error 0.2
`;

const OPTIONS = {
  env: { type: 'string' },
  policy: { type: 'string', multiple: true },
  group: { type: 'string', multiple: true },
  'seed-cost': { type: 'string' },
  episodes: { type: 'string' },
  'target-error': { type: 'string' },
  difference: { type: 'string' },
  power: { type: 'string' },
  pilot: { type: 'string' },
  confidence: { type: 'string' },
  bounds: { type: 'string' },
  sigma: { type: 'string' },
  seed: { type: 'string' },
  workers: { type: 'string' },
  json: { type: 'boolean' },
  start: { type: 'string' },
  noise: { type: 'string' },
} as const;

function seconds(episodes: number | null, rate: number): number | null {
  return episodes === null || !Number.isFinite(episodes) ? null : episodes / rate;
}

/**
 * Seconds `work` takes: the planned run's analysis, timed on the pilot's returns. Timed on a
 * second call, once compiled: at a long run's size, compiling is a negligible part.
 */
function timed(work: () => unknown): number {
  work();
  const started = performance.now();
  work();
  return (performance.now() - started) / 1000;
}

/**
 * Sampling and analysis of a run of `episodes`: the pilot's rate for the first, the pilot's
 * analysis time grown as n log n (figures.ts) for the second.
 */
function runSeconds(episodes: number | null, rate: number, pilotAnalysis: number, pilotEpisodes: number): { total: number | null; analysis: number | null } {
  const sampling = seconds(episodes, rate);
  if (sampling === null || episodes === null) return { total: null, analysis: null };
  const analysis = projectedAnalysisSeconds(pilotAnalysis, pilotEpisodes, episodes);
  return { total: sampling + analysis, analysis };
}

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('plan', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const envPath = required('plan', 'env', values.env, '--env envs/warehouse.json');
  const policyPaths = (values.policy as string[] | undefined) ?? [];
  const groupValues = (values.group as string[] | undefined) ?? [];
  if (groupValues.length > 0) {
    if (policyPaths.length > 0) throw new InputError('--policy', 'plan with --group or with --policy, not both');
    const groups = groupValues.map(parseGroupOption);
    const options = parseRunOptions(values);
    const env = readDefinitionFile(envPath);
    const plan = await planGroups({
      envPath,
      groups,
      seed: options.seed,
      start: options.start,
      noise: noiseMode(values.noise, 'compare', env.json),
      workers: options.workers,
      level: options.level,
      seedCost: values['seed-cost'] === undefined ? null : parseOption('seed-cost', 'seedCost', values['seed-cost']),
      episodes: values.episodes === undefined ? 10_000 : parseOption('episodes', 'episodes', values.episodes),
      targetError: values['target-error'] === undefined ? null : parseOption('target-error', 'targetError', values['target-error']),
      difference: values.difference === undefined ? null : parseOption('difference', 'targetError', values.difference),
      power: values.power === undefined ? 0.8 : parseOption('power', 'confidence', values.power),
      pilotEpisodes: values.pilot === undefined ? null : parseOption('pilot', 'episodes', values.pilot),
    });
    process.stdout.write(values.json ? `${JSON.stringify(plan, null, 2)}\n` : groupPlanText(plan));
    return 0;
  }
  if (values['seed-cost'] !== undefined) throw new InputError('--seed-cost', 'plans a training method: give it with --group NAME=FILES');
  if (policyPaths.length === 0) throw new InputError('--policy', "is required; e.g. --policy envs/picker-direct.json (see 'reckon plan --help')");
  if (policyPaths.length > 2) throw new InputError('--policy', 'plan takes one policy (an estimate) or two (a comparison)');
  const { seed, workers, level, bounds: userBounds, sigma: givenSigma, start } = parseRunOptions(values);
  const sigma = givenSigma ?? undefined;
  const pilotEpisodes = values.pilot === undefined ? null : parseOption('pilot', 'episodes', values.pilot);
  const env = readDefinitionFile(envPath);
  const pilotOptions = { episodes: pilotEpisodes, seconds: 2, minEpisodes: 100, maxEpisodes: 200_000, workers };
  const noise = noiseMode(values.noise, policyPaths.length === 2 ? 'compare' : 'estimate', env.json);
  const pilot = (policyPath: string) => runPilot({ env, policy: readDefinitionFile(policyPath), seed, start, noise }, pilotOptions);

  if (policyPaths.length === 2) {
    if (values.difference === undefined) throw new InputError('--difference', 'is required with two policies: the smallest true difference worth detecting, e.g. --difference 0.05');
    const effect = parseOption('difference', 'targetError', values.difference);
    const power = values.power === undefined ? 0.8 : parseOption('power', 'confidence', values.power);
    const pilots: PilotResult[] = [];
    for (const p of policyPaths) pilots.push(await pilot(p));
    const n = Math.min(pilots[0].returns.length, pilots[1].returns.length);
    const gain = pairingGain(pilots[0].returns.subarray(0, n), pilots[1].returns.subarray(0, n));
    const sigmaDifference = Math.sqrt(gain.varianceDifference);
    const size = pairedSampleSize({ effect, sigmaDifference, level, power });
    // Both policies run each pair: the time per pair is the sum of their times per episode.
    const rate = 1 / (1 / pilots[0].episodesPerSecond + 1 / pilots[1].episodesPerSecond);
    const independent = pairedSampleSize({ effect, sigmaDifference: Math.sqrt(gain.varianceFirst + gain.varianceSecond), level, power });
    const pilotAnalysis = timed(() => comparePolicies([pilots[0].returns.subarray(0, n), pilots[1].returns.subarray(0, n)], { level }));
    const projected = runSeconds(size.exactPairs, rate, pilotAnalysis, n);
    const out = {
      env: envPath,
      policies: policyPaths,
      difference: effect,
      power,
      level,
      noise,
      pilot: { episodes: n, seconds: pilots[0].seconds + pilots[1].seconds, pairs_per_second: rate },
      sigma_difference: sigmaDifference,
      correlation: gain.correlation,
      variance_reduction: gain.varianceReduction,
      episodes_needed: size.exactPairs,
      episodes_needed_z: size.zPairs,
      power_at_episodes_needed: size.powerAtExactPairs,
      episodes_needed_unpaired: independent.exactPairs,
      seconds: projected.total,
      analysis_seconds: projected.analysis,
      workers,
    };
    if (values.json) {
      process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
      return 0;
    }
    process.stdout.write(
      [
        `Plan: detect a true difference of ${effect} between ${policyPaths[0]} and ${policyPaths[1]} in ${envPath}`,
        `  with power ${power} at the ${level * 100}% level (two-sided paired t test, common random numbers, ${NOISE_WORDS[noise]})`,
        '',
        `  pilot            ${count(n)} episodes per policy; σ of the paired difference ${sig(sigmaDifference)}, correlation ${gain.correlation.toFixed(3)}`,
        `  episodes needed  ${count(size.exactPairs)} per policy (exact power ${size.powerAtExactPairs.toFixed(4)}; normal approximation ${count(size.zPairs)})`,
        `  time             ${duration(out.seconds)} at ${formatRate(rate)} pairs/s on ${workers} worker${workers === 1 ? '' : 's'} (${duration(projected.analysis)} of it analysis)`,
        `  without pairing  ${count(independent.exactPairs)} per policy: pairing saves ${sig(gain.varianceReduction, 3)}×`,
        '',
      ].join('\n'),
    );
    return 0;
  }

  if (values['target-error'] === undefined) throw new InputError('--target-error', "is required: the half-width to plan for, e.g. --target-error 0.01 (see 'reckon plan --help')");
  const epsilon = parseOption('target-error', 'targetError', values['target-error']);
  const result = await pilot(policyPaths[0]);
  const summary = summarize(result.returns);
  const bounds = userBounds ?? result.facts.returnBounds;
  const plan = planEpisodes({ pilot: summary, epsilon, level, bounds, sigma });
  const sequentialMethod = bounds ? 'betting' : sigma !== undefined ? 'normal-mixture' : null;
  const sequential = sequentialMethod === 'betting' ? plan.betting : sequentialMethod === 'normal-mixture' ? plan.normalMixture.episodes : null;
  const rate = result.episodesPerSecond;
  const pilotAnalysis = timed(() => tInterval(summarize(result.returns), level));
  const total = (episodes: number | null) => runSeconds(episodes, rate, pilotAnalysis, summary.n);
  const out = {
    env: envPath,
    policy: policyPaths[0],
    target_error: epsilon,
    level,
    noise,
    pilot: { episodes: summary.n, mean: summary.mean, std: summary.std, seconds: result.seconds, episodes_per_second: rate },
    episodes_needed: plan.fixedT,
    episodes_needed_sequential: sequential,
    sequential_method: sequentialMethod,
    episodes_needed_empirical_bernstein: plan.empiricalBernstein,
    episodes_needed_normal_mixture: plan.normalMixture.sigmaSource === 'estimated' ? null : plan.normalMixture.episodes,
    episodes_needed_hoeffding: plan.hoeffding,
    seconds: { fixed: total(plan.fixedT).total, sequential: total(sequential).total, hoeffding: total(plan.hoeffding).total },
    analysis_seconds: { fixed: total(plan.fixedT).analysis, sequential: total(sequential).analysis, hoeffding: total(plan.hoeffding).analysis },
    return_bounds: bounds,
    workers,
    note: 'projections use the pilot\'s standard deviation, so a run reaches the target about half the time at the projected size',
  };
  if (values.json) {
    process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
    return 0;
  }
  const rows = [['run', 'episodes', 'time at this machine\'s rate (sampling + analysis)']];
  rows.push(['fixed n, Student t', count(plan.fixedT), duration(out.seconds.fixed)]);
  if (sequential !== null) rows.push([`until ±${epsilon} (--target-error, ${sequentialMethod})`, Number.isFinite(sequential) ? count(sequential) : 'over 10⁹', duration(out.seconds.sequential)]);
  if (plan.empiricalBernstein !== null) {
    rows.push([`until ±${epsilon} (--target-error --ci empirical-bernstein)`, Number.isFinite(plan.empiricalBernstein) ? count(plan.empiricalBernstein) : 'over 10⁹', duration(seconds(plan.empiricalBernstein, rate))]);
  }
  if (out.episodes_needed_normal_mixture !== null && sequentialMethod !== 'normal-mixture') {
    rows.push([`until ±${epsilon} (--target-error --ci normal-mixture)`, count(plan.normalMixture.episodes), duration(total(plan.normalMixture.episodes).total)]);
  }
  if (plan.hoeffding !== null) rows.push(['fixed n, Hoeffding (distribution-free)', count(plan.hoeffding), duration(out.seconds.hoeffding)]);
  process.stdout.write(
    [
      `Plan: ${policyPaths[0]} in ${envPath} to within ±${epsilon} at the ${level * 100}% level`,
      '',
      `  pilot  ${count(summary.n)} episodes in ${duration(result.seconds)}: mean ${sig(summary.mean)}, std ${sig(summary.std)}, ${formatRate(rate)} episodes/s on ${workers} worker${workers === 1 ? '' : 's'}`,
      '',
      ...columns(rows),
      '',
      sequential === null ? '  (no return bounds and no --sigma: a run until the target has no valid interval to stop on; give --bounds or --sigma)' : '',
      `  Projections use the pilot's spread: a run of the projected size reaches ±${epsilon} about half the time.`,
      '',
    ]
      .filter((line, i, all) => line !== '' || all[i - 1] !== '')
      .join('\n'),
  );
  return 0;
}
