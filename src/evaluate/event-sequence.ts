import type { EventSpec } from '../options/risk-options.js';
import type { RunningInterval, SequentialInterval } from '../stats/index.js';
import { episodeTest, resolveEvent, type EpisodeEvent } from './episode-events.js';
import type { EnvironmentFacts } from './environment-facts.js';
import { makeRunningInterval, type SequenceSettings } from './sequence.js';

/**
 * A confidence sequence on the probability of an event: each episode becomes its indicator (1
 * when the event happens: its return, its length or the terminal it ended in), a bounded mean
 * on [0, 1], so the betting sequence applies as it does to returns (Waudby-Smith & Ramdas 2024)
 * and a run may stop when the event's interval is narrow.
 */
export class EventIndicatorSequence implements RunningInterval {
  private readonly single = new Float64Array(1);
  private readonly happens: (ret: number, length: number, final: number) => boolean;
  count = 0;

  constructor(
    readonly event: EpisodeEvent,
    private readonly inner: RunningInterval,
  ) {
    this.happens = episodeTest(event);
  }

  get episodes(): number {
    return this.inner.episodes;
  }

  /** Adds one episode, in episode order. */
  addEpisode(ret: number, length: number, final: number): void {
    const happened = this.happens(ret, length, final);
    if (happened) this.count++;
    this.single[0] = happened ? 1 : 0;
    this.inner.add(this.single);
  }

  /** Adds episodes in order (lengths and final states are needed for length and terminal events). */
  addEpisodes(returns: Float64Array, lengths: Uint32Array | null, finals: Int32Array | null): void {
    for (let i = 0; i < returns.length; i++) this.addEpisode(returns[i], lengths ? lengths[i] : Number.NaN, finals ? finals[i] : Number.NaN);
  }

  /** Returns alone: enough for a return event only. */
  add(values: Float64Array | number[]): void {
    if (this.event.spec.subject !== 'return') throw new Error(`the sequence of ${this.event.spec.text} needs lengths and final states, not returns alone`);
    for (let i = 0; i < values.length; i++) this.addEpisode(values[i], Number.NaN, Number.NaN);
  }

  interval(): SequentialInterval {
    return this.inner.interval();
  }

  /** The inner sequence's refined interval when it has one (the betting sequence does). */
  refined(): SequentialInterval {
    const inner = this.inner as RunningInterval & { refined?: () => SequentialInterval };
    return inner.refined ? inner.refined() : inner.interval();
  }
}

/** The sequence a run stopping on an event's probability uses: betting on [0, 1], bets aimed at the target. */
export function eventSequenceSettings(level: number, targetError: number, plannedEpisodes: number): SequenceSettings {
  return { method: 'betting', level, bounds: [0, 1], sigma: null, targetError, plannedEpisodes };
}

/** The event's sequence, the event resolved against the run's environment (a terminal's name checked). */
export function makeEventSequence(event: EventSpec, settings: SequenceSettings, facts: Pick<EnvironmentFacts, 'kind' | 'terminals'>): EventIndicatorSequence {
  return new EventIndicatorSequence(resolveEvent(event, facts, '--target-event'), makeRunningInterval(settings));
}
