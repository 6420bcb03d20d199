import { InputError } from '../errors.js';
import { eventHappens, type EventSpec, type RiskRequest } from '../options/risk-options.js';
import { dkwEpsilon } from '../stats/dkw.js';
import { clopperPearson, episodesForZeroEventBound, wilson, type ProportionInterval } from '../stats/event-probability.js';
import { quantileInterval, type QuantileInterval } from '../stats/quantile-interval.js';
import { tailMean, type TailMean } from '../stats/tail-mean.js';
import type { ReturnsBuffer } from './returns-buffer.js';
import type { EnvironmentFacts } from './environment-facts.js';
import { resolveEvent } from './episode-events.js';

/** Below this many tail episodes (n·α) the bootstrap of the tail mean falls short of its level. */
export const BOOTSTRAP_TAIL_EPISODES = 50;
/** Probability bounds for which a run without events says how many episodes they need. */
const ZERO_EVENT_TARGETS = [1e-3, 1e-4];

export interface EventFigure {
  readonly event: string;
  readonly count: number;
  readonly episodes: number;
  readonly estimate: number;
  readonly clopperPearson: ProportionInterval;
  readonly wilson: ProportionInterval;
  /** When the event never happened: the one-sided 95%-style upper bound, and the episodes smaller bounds need. */
  readonly zeroEvents: { readonly upper: number; readonly episodesFor: readonly { readonly bound: number; readonly episodes: number }[] } | null;
}

export interface RiskFigures {
  readonly level: number;
  readonly quantiles: readonly QuantileInterval[];
  readonly tail: TailMean;
  readonly events: readonly EventFigure[];
  /** Half-width of the DKW band around the empirical CDF at this level. */
  readonly dkwEpsilon: number;
  readonly warnings: readonly string[];
}

/**
 * The risk figures of a run from its kept returns (and its length histogram): quantiles with
 * order-statistic intervals, the lower-tail mean with DKW and bootstrap intervals, and the
 * probability of each event with Clopper–Pearson and Wilson intervals (docs/methods.md §14).
 */
export function riskFigures(
  buffer: ReturnsBuffer,
  request: RiskRequest,
  options: { level: number; bounds: readonly [number, number] | null; seed: number; facts: Pick<EnvironmentFacts, 'kind' | 'terminals'> },
): RiskFigures {
  const returns = buffer.view();
  const n = returns.length;
  if (n < 2) throw new InputError('--risk', `needs at least 2 episodes (got ${n})`);
  const sorted = Float64Array.from(returns).sort();
  const { level, bounds } = options;
  const quantiles = request.quantiles.map((p) => quantileInterval(sorted, p, level, bounds));
  const tail = tailMean(sorted, request.tail, level, bounds, options.seed);
  const events = request.events.map((event) => eventFigure(event, buffer, sorted, level, options.facts));
  const warnings: string[] = [];
  if (!bounds) warnings.push('no return bounds: the tail mean has only the approximate bootstrap interval; give --bounds LOW,HIGH for one that holds at any n');
  if (n * request.tail < BOOTSTRAP_TAIL_EPISODES) {
    warnings.push(
      `the worst ${request.tail * 100}% is ${+(n * request.tail).toFixed(1)} episodes: the bootstrap interval of its mean covers less than its level below ${BOOTSTRAP_TAIL_EPISODES}; rely on the DKW interval or run more episodes`,
    );
  }
  return { level, quantiles, tail, events, dkwEpsilon: dkwEpsilon(n, level), warnings };
}

function eventFigure(event: EventSpec, buffer: ReturnsBuffer, sorted: Float64Array, level: number, facts: Pick<EnvironmentFacts, 'kind' | 'terminals'>): EventFigure {
  const n = sorted.length;
  let count: number;
  if (event.subject === 'terminal') {
    const ended = buffer.endedIn(resolveEvent(event, facts).states!);
    if (ended === null) throw new InputError('--event', `"${event.text}": where this run's episodes ended was not recorded (episodes stored before reckon kept it); run it again to count terminal events`);
    count = ended;
  } else if (event.subject === 'return') {
    count = 0;
    for (let i = 0; i < n; i++) if (eventHappens(event, sorted[i])) count++;
  } else {
    const histogram = buffer.lengthCounts;
    if (!histogram) throw new InputError('--event', `"${event.text}": episode lengths are not counted for horizons this long`);
    count = 0;
    for (let k = 0; k < histogram.length; k++) if (eventHappens(event, k)) count += histogram[k];
  }
  const zeroEvents =
    count === 0
      ? {
          upper: clopperPearson(0, n, level, true).high,
          episodesFor: ZERO_EVENT_TARGETS.map((bound) => ({ bound, episodes: episodesForZeroEventBound(bound, level) })),
        }
      : null;
  return { event: event.text, count, episodes: n, estimate: count / n, clopperPearson: clopperPearson(count, n, level), wilson: wilson(count, n, level), zeroEvents };
}
