import { InputError } from '../errors.js';
import {
  BettingSequence,
  ChowRobbinsRule,
  EmpiricalBernsteinSequence,
  NormalMixtureSequence,
  episodesNeeded,
  episodesNeededBetting,
  episodesNeededEmpiricalBernstein,
  episodesNeededNormalMixture,
  type BetSchedule,
  type ReturnSummary,
  type RunningInterval,
  type SequentialInterval,
} from '../stats/index.js';

/**
 * The intervals a run may stop on when it stops because the interval is narrow enough
 * (`--target-error`). A fixed-n interval loses its coverage under such a data-dependent stop;
 * these keep it (the first two, anytime-valid) or keep it in the limit (Chow–Robbins).
 */
export const SEQUENCE_METHODS = ['betting', 'empirical-bernstein', 'normal-mixture', 'chow-robbins'] as const;
export type SequenceChoice = (typeof SEQUENCE_METHODS)[number];

export function isSequenceMethod(name: string): name is SequenceChoice {
  return (SEQUENCE_METHODS as readonly string[]).includes(name);
}

export interface SequenceSettings {
  readonly method: SequenceChoice;
  readonly level: number;
  readonly bounds: readonly [number, number] | null;
  /** The user's sub-Gaussian scale for the normal mixture (`--sigma`). */
  readonly sigma: number | null;
  readonly targetError: number;
  /**
   * A fixed-size run's planned episodes, to which the betting sequence tunes its bets when there
   * is no target, or a target-error run's cap, beyond which its bets are never tuned; null (and
   * no target) bets for open-ended monitoring.
   */
  readonly plannedEpisodes?: number | null;
}

/**
 * The default for a target-error run: the betting sequence with bets aimed at the target when
 * returns are bounded (adapts to the variance, assumes nothing else, and needs the fewest
 * episodes of the anytime-valid choices), else the normal mixture with the user's σ. With
 * neither, nothing anytime-valid is possible: say what would make it so.
 */
export function chooseSequence(requested: string | null, bounds: readonly [number, number] | null, sigma: number | null): SequenceChoice {
  if (requested !== null) {
    if (isSequenceMethod(requested)) {
      if ((requested === 'empirical-bernstein' || requested === 'betting') && !bounds) {
        throw new InputError(`--ci ${requested}`, 'needs return bounds: give --bounds LOW,HIGH (none are known for this environment)');
      }
      if (requested === 'normal-mixture' && !bounds && sigma === null) {
        throw new InputError('--ci normal-mixture', 'needs a variance assumption: give --sigma S (the returns\' sub-Gaussian scale) or --bounds LOW,HIGH');
      }
      return requested;
    }
    throw new InputError(
      '--ci',
      `"${requested}" is a fixed-sample interval, which loses its coverage when the run stops on the data; with --target-error use ${SEQUENCE_METHODS.join(', ')}`,
    );
  }
  if (bounds) return 'betting';
  if (sigma !== null) return 'normal-mixture';
  throw new InputError(
    '--target-error',
    'needs either return bounds (--bounds LOW,HIGH, or an environment that declares its reward range) or a variance assumption (--sigma S) for an interval that stays valid when the run stops on the data; --ci chow-robbins is an asymptotic alternative',
  );
}

export function makeRunningInterval(settings: SequenceSettings): RunningInterval {
  const bounds = settings.bounds ? ([settings.bounds[0], settings.bounds[1]] as [number, number]) : null;
  switch (settings.method) {
    case 'betting':
      return new BettingSequence({ level: settings.level, bounds: bounds!, schedule: betSchedule(settings) });
    case 'empirical-bernstein':
      return new EmpiricalBernsteinSequence({ level: settings.level, bounds: bounds! });
    case 'normal-mixture': {
      const sigma = settings.sigma ?? (bounds![1] - bounds![0]) / 2;
      // ρ tuned to the episodes this σ and target imply, so the boundary is tightest there.
      const { rho } = episodesNeededNormalMixture({ epsilon: settings.targetError, sigma, level: settings.level });
      return new NormalMixtureSequence({ level: settings.level, sigma: settings.sigma ?? undefined, bounds, rho });
    }
    case 'chow-robbins':
      return new ChowRobbinsRule({ level: settings.level, minEpisodes: 10 });
  }
}

/** Bets aimed at the target when there is one, else tuned to the planned size, else open-ended. */
function betSchedule(settings: SequenceSettings): BetSchedule {
  if (Number.isFinite(settings.targetError) && settings.targetError > 0) {
    return { kind: 'target', halfWidth: settings.targetError, maxEpisodes: settings.plannedEpisodes ?? undefined };
  }
  if (settings.plannedEpisodes != null) return { kind: 'planned', episodes: settings.plannedEpisodes };
  return { kind: 'anytime' };
}

/** Whether the run may stop now. Chow–Robbins has its own test; the others stop when narrow enough. */
export function targetReached(sequence: RunningInterval, settings: SequenceSettings): boolean {
  if (sequence instanceof ChowRobbinsRule) return sequence.reached(settings.targetError);
  return sequence.interval().halfWidth <= settings.targetError;
}

/**
 * The reported interval: the sequence's (the betting one with its endpoints refined), except
 * Chow–Robbins, which reports mean ± d once stopped.
 */
export function sequenceInterval(sequence: RunningInterval, settings: SequenceSettings, reached: boolean, mean: number) {
  const refinable = sequence as RunningInterval & { refined?: () => SequentialInterval };
  const interval = refinable.refined ? refinable.refined() : sequence.interval();
  if (sequence instanceof ChowRobbinsRule && reached) {
    return { ...interval, low: mean - settings.targetError, high: mean + settings.targetError, halfWidth: settings.targetError };
  }
  return interval;
}

/** Episodes a run of this sequence would need for half-width ε, from the current returns. */
export function sequenceEpisodesNeeded(settings: SequenceSettings, summary: ReturnSummary, epsilon: number): number {
  switch (settings.method) {
    case 'betting':
      return episodesNeededBetting({ epsilon, mean: summary.mean, variance: summary.variance, bounds: [settings.bounds![0], settings.bounds![1]], level: settings.level, schedule: { kind: 'target', halfWidth: epsilon } });
    case 'empirical-bernstein':
      return episodesNeededEmpiricalBernstein({ epsilon, variance: summary.variance, bounds: [settings.bounds![0], settings.bounds![1]], level: settings.level });
    case 'normal-mixture':
      return episodesNeededNormalMixture({ epsilon, sigma: settings.sigma ?? (settings.bounds![1] - settings.bounds![0]) / 2, level: settings.level }).episodes;
    case 'chow-robbins':
      return Math.max(10, episodesNeeded('normal', summary, epsilon, settings.level));
  }
}
