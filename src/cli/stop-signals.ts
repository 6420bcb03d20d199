import type { StoppedEarly } from '../errors.js';
import { count } from '../report/format.js';

/**
 * Ctrl-C (SIGINT) and SIGTERM, what a batch scheduler sends at a job's time limit, end a run
 * cleanly: the first one stops new episodes, the episodes already finished are committed and
 * the run is marked interrupted. A second signal exits at once; every chunk committed by then
 * is kept, and the run reads as interrupted because its process is gone.
 */
export class StopSignals {
  private readonly controller = new AbortController();
  /** The signal that stopped the run, if any. */
  received: NodeJS.Signals | null = null;

  private readonly onSignal = (signal: NodeJS.Signals) => {
    if (this.received !== null) {
      process.stderr.write(`\nreckon: ${signal} again: stopping now; the episodes committed so far are kept\n`);
      process.exit(exitCodeFor(signal));
    }
    this.received = signal;
    this.controller.abort();
  };

  constructor() {
    process.on('SIGINT', this.onSignal);
    process.on('SIGTERM', this.onSignal);
  }

  get signal(): AbortSignal {
    return this.controller.signal;
  }

  /** The conventional exit code of a process ended by the signal received: 128 + its number. */
  exitCode(): number {
    return exitCodeFor(this.received ?? 'SIGINT');
  }

  dispose(): void {
    process.off('SIGINT', this.onSignal);
    process.off('SIGTERM', this.onSignal);
  }
}

/**
 * What a run stopped before its first figures prints (StoppedEarly): how far it got and how to
 * continue it; returns the exit code of the signal, as for any interrupted run.
 */
export function reportStoppedEarly(e: StoppedEarly, stop: StopSignals, resumeCommand: (runId: string) => string): number {
  const how = e.runId ? ` Continue it with: ${resumeCommand(e.runId)}` : ' No episode had run, so nothing was stored.';
  const when = e.creating ? 'while the environment and policy were being created' : `after ${count(e.episodes)} of ${count(e.requested)} episodes, all kept`;
  process.stderr.write(`reckon: interrupted${stop.received ? ` (${stop.received})` : ''} ${when}.${how}\n`);
  return stop.exitCode();
}

function exitCodeFor(signal: NodeJS.Signals): number {
  return signal === 'SIGTERM' ? 143 : 130;
}
