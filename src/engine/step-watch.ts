import { PluginError } from '../errors.js';
import { clockPosition } from './plugin-clock.js';

/** Default for `--step-timeout`: far beyond any sane step, short enough to notice a hang. */
export const DEFAULT_STEP_TIMEOUT_SECONDS = 10;

/**
 * Watches one worker thread's plug-in clock from the main thread. While the worker has work
 * in hand, a clock that has not moved for longer than the timeout means one plug-in call
 * (a step, a reset, a policy's act) has not returned: the watch reports it as a PluginError
 * naming the episode and step, and the pool stops the thread, which no signal could.
 */
export class StepWatch {
  private readonly view: Float64Array;
  private lastEpisode = Number.NaN;
  private lastPosition = Number.NaN;
  private lastMoved = performance.now();

  constructor(buffer: SharedArrayBuffer, private readonly busy: () => boolean) {
    this.view = new Float64Array(buffer);
  }

  /** A PluginError if the worker has been stuck in one call for more than `timeoutSeconds`. */
  check(now: number, timeoutSeconds: number): PluginError | null {
    const episode = this.view[0];
    const position = this.view[1];
    if (!this.busy() || episode !== this.lastEpisode || position !== this.lastPosition) {
      this.lastEpisode = episode;
      this.lastPosition = position;
      this.lastMoved = now;
      return null;
    }
    if (now - this.lastMoved <= timeoutSeconds * 1000 || episode < 0) return null;
    const where = clockPosition(episode, position);
    return new PluginError(
      where.plugin,
      where.episode,
      where.step,
      new Error(`no answer within ${timeoutSeconds} s (raise --step-timeout if it is only slow)`),
      'hung',
    );
  }
}

/** How often the pool looks at its workers' clocks for a given timeout. */
export function watchInterval(timeoutSeconds: number): number {
  return Math.max(20, Math.min(1000, (timeoutSeconds * 1000) / 4));
}
