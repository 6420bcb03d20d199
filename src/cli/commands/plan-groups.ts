import { readDefinitionFile, readGroupOption, type GroupOption } from '../../definitions/index.js';
import type { NoiseMode } from '../../engine/noise.js';
import { InputError } from '../../errors.js';
import { runPilot } from '../../evaluate/pilot.js';
import { columns, count, duration, sig } from '../../report/format.js';
import { episodesPerMember, groupMean, seedsForHalfWidth, seedsForPower } from '../../stats/groups/index.js';

export interface GroupPlanRequest {
  readonly envPath: string;
  readonly groups: readonly GroupOption[];
  readonly seed: number;
  readonly start: string | null;
  readonly noise: NoiseMode;
  readonly workers: number;
  readonly level: number;
  /** Seconds to train one more seed; null: no allocation, plan at `episodes` per member. */
  readonly seedCost: number | null;
  /** Episodes per member when no seed cost is given. */
  readonly episodes: number;
  readonly targetError: number | null;
  readonly difference: number | null;
  readonly power: number;
  readonly pilotEpisodes: number | null;
}

/** What `plan --group` prints as JSON. */
export interface GroupPlan {
  env: string;
  level: number;
  noise: NoiseMode;
  seed_cost_seconds: number | null;
  groups: {
    name: string;
    members: number;
    pilot_episodes: number;
    episode_seconds: number;
    between_seeds: number;
    within_policy: number;
    icc: number;
    episode_share_at_pilot: number;
    episodes_per_member: number;
    episodes_per_member_source: 'allocation' | 'episodes' | 'allocation-unbounded';
    seeds_for_target_error: number | null;
    seconds_for_target_error: number | null;
  }[];
  difference: number | null;
  power: number;
  effect_size: number | null;
  seeds_per_group_for_difference: number | null;
  power_at_seeds: number | null;
  note: string;
}

/** Per member the pilot gets about this many seconds, so a group of ten plans in a few seconds. */
const PILOT_SECONDS_PER_MEMBER = 0.5;
/** An allocation with no measurable seed variability is shown as this many episodes at most. */
const UNBOUNDED_EPISODES = 1_000_000;

/**
 * `plan --group`: a short pilot of every member on common random numbers gives each group's
 * σ̂²_b, σ̂²_w and the cost of an episode on this machine; with the cost of training a seed
 * it gives the episodes per member n* = √((c_seed/c_episode)·σ²_w/σ²_b), then the seeds that
 * reach a half-width or detect a difference with the given power (docs/methods.md §15.5).
 */
export async function planGroups(request: GroupPlanRequest): Promise<GroupPlan> {
  if (request.targetError === null && request.difference === null) {
    throw new InputError('--target-error', "with --group give --target-error E (the group mean's half-width to reach) or --difference D (between methods)");
  }
  const env = readDefinitionFile(request.envPath);
  const pilotOptions = { episodes: request.pilotEpisodes, seconds: PILOT_SECONDS_PER_MEMBER, minEpisodes: 100, maxEpisodes: 200_000, workers: request.workers };
  const rows: GroupPlan['groups'] = [];
  for (const option of request.groups) {
    const members = readGroupOption(option);
    const returns: Float64Array[] = [];
    let episodeSeconds = 0;
    for (const member of members) {
      const pilot = await runPilot({ env, policy: member, seed: request.seed, start: request.start, noise: request.noise }, pilotOptions);
      returns.push(pilot.returns);
      episodeSeconds += 1 / pilot.episodesPerSecond / members.length;
    }
    const n = Math.min(...returns.map((r) => r.length));
    const g = groupMean(returns.map((r) => r.subarray(0, n)), { level: request.level, sharedEpisodes: true, seed: request.seed });
    const between = g.components.betweenVariance;
    const within = g.components.withinVariance;
    let perMember = request.episodes;
    let source: GroupPlan['groups'][number]['episodes_per_member_source'] = 'episodes';
    if (request.seedCost !== null) {
      const best = episodesPerMember(request.seedCost, episodeSeconds, within, between);
      source = Number.isFinite(best) ? 'allocation' : 'allocation-unbounded';
      perMember = Math.min(UNBOUNDED_EPISODES, best);
    }
    const seeds = request.targetError === null ? null : seedsForHalfWidth(request.targetError, between, within, perMember, request.level);
    const seedCost = request.seedCost ?? 0;
    rows.push({
      name: option.name,
      members: members.length,
      pilot_episodes: n,
      episode_seconds: episodeSeconds,
      between_seeds: between,
      within_policy: within,
      icc: g.components.intraclassCorrelation,
      episode_share_at_pilot: g.episodeShare,
      episodes_per_member: perMember,
      episodes_per_member_source: source,
      seeds_for_target_error: seeds !== null && Number.isFinite(seeds) ? seeds : null,
      seconds_for_target_error: seeds !== null && Number.isFinite(seeds) ? seeds * (seedCost + perMember * episodeSeconds) : null,
    });
  }
  let effect: number | null = null;
  let sized: { seeds: number; power: number } | null = null;
  if (request.difference !== null) {
    // The spread of one member's measured value: its seed variability plus its episode noise.
    const spread = rows.reduce((s, r) => s + (r.between_seeds + r.within_policy / r.episodes_per_member) / rows.length, 0);
    effect = request.difference / Math.sqrt(spread);
    sized = seedsForPower(effect, request.level, request.power);
  }
  return {
    env: request.envPath,
    level: request.level,
    noise: request.noise,
    seed_cost_seconds: request.seedCost,
    groups: rows,
    difference: request.difference,
    power: request.power,
    effect_size: effect,
    seeds_per_group_for_difference: sized && Number.isFinite(sized.seeds) ? sized.seeds : null,
    power_at_seeds: sized && Number.isFinite(sized.seeds) ? sized.power : null,
    note: "σ_b comes from the pilot's few members and is itself uncertain: re-plan once more seeds are trained",
  };
}

/** The plan as text: the variance split, the allocation and the seeds it takes. */
export function groupPlanText(plan: GroupPlan): string {
  const lines = [`Plan: training methods across seeds in ${plan.env} at the ${plan.level * 100}% level`, ''];
  const rows = [['group', 'members', 'σ_b (seeds)', 'σ_w (episodes)', 'ICC', 'episode cost', 'episodes a member', plan.groups[0]?.seeds_for_target_error !== undefined ? 'seeds needed' : '']];
  for (const g of plan.groups) {
    const perMember = g.episodes_per_member_source === 'allocation-unbounded' ? `${count(g.episodes_per_member)}+` : count(g.episodes_per_member);
    rows.push([
      g.name,
      String(g.members),
      sig(Math.sqrt(g.between_seeds), 3),
      sig(Math.sqrt(g.within_policy), 3),
      g.icc.toFixed(3),
      perEpisode(g.episode_seconds),
      perMember,
      g.seeds_for_target_error === null ? '–' : `${count(g.seeds_for_target_error)} (${duration(g.seconds_for_target_error)})`,
    ]);
  }
  lines.push(...columns(rows), '');
  if (plan.seed_cost_seconds !== null) {
    lines.push(`  One more seed costs ${duration(plan.seed_cost_seconds)} of training; episodes a member n* = √((c_seed/c_episode)·σ²_w/σ²_b) spends the budget best.`);
    for (const g of plan.groups) {
      if (g.episodes_per_member_source === 'allocation-unbounded') {
        lines.push(`  ${g.name}: the pilot saw no seed variability beyond episode noise, so episodes are the cheaper buy; pilot longer (--pilot N) to measure σ_b.`);
      } else {
        lines.push(`  ${g.name}: evaluate each seed with about ${count(g.episodes_per_member)} episodes; beyond that, train more seeds instead.`);
      }
    }
  } else {
    lines.push(`  At ${count(plan.groups[0]?.episodes_per_member ?? 0)} episodes a member (--episodes); give --seed-cost T (e.g. 2h) for the best number of episodes a member.`);
  }
  if (plan.seeds_per_group_for_difference !== null) {
    lines.push(
      `  To detect a difference of ${plan.difference} between methods with power ${plan.power} (two-sided two-sample t, noncentral t): ${plan.seeds_per_group_for_difference} seeds a group (standardised difference ${sig(plan.effect_size!, 3)}, exact power ${plan.power_at_seeds!.toFixed(4)}).`,
    );
  }
  lines.push(`  Note: ${plan.note}.`, '');
  return lines.join('\n');
}

/** Seconds an episode takes, in µs, ms or s. */
function perEpisode(seconds: number): string {
  if (seconds < 1e-3) return `${sig(seconds * 1e6, 3)} µs`;
  if (seconds < 1) return `${sig(seconds * 1e3, 3)} ms`;
  return `${sig(seconds, 3)} s`;
}
