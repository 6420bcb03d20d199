import { InputError } from '../errors.js';
import { eventHappens, type EventSpec } from '../options/risk-options.js';
import type { RunningInterval, SequentialInterval } from '../stats/index.js';
import { makeRunningInterval, type SequenceSettings } from './sequence.js';

/**
 * A confidence sequence on the probability of an event: each return becomes its indicator (1 when
 * the event happens), a bounded mean on [0, 1], so the betting sequence applies as it does to
 * returns (Waudby-Smith & Ramdas 2024) and a run may stop when the event's interval is narrow.
 */
export class EventIndicatorSequence implements RunningInterval {
  private readonly single = new Float64Array(1);
  count = 0;

  constructor(
    readonly event: EventSpec,
    private readonly inner: RunningInterval,
  ) {}

  get episodes(): number {
    return this.inner.episodes;
  }

  add(values: Float64Array | number[]): void {
    for (let i = 0; i < values.length; i++) {
      const happened = eventHappens(this.event, values[i]);
      if (happened) this.count++;
      this.single[0] = happened ? 1 : 0;
      this.inner.add(this.single);
    }
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

export function makeEventSequence(event: EventSpec, settings: SequenceSettings): EventIndicatorSequence {
  if (event.subject !== 'return') {
    throw new InputError('--target-event', `"${event.text}": a run can stop on return events only (return<X, return>=X, …); episode lengths are not kept in order`);
  }
  return new EventIndicatorSequence(event, makeRunningInterval(settings));
}
