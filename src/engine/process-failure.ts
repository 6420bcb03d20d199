/**
 * A process environment's failures as PluginErrors that name the episode and step, so the
 * same seed replays them: an exception the helper caught (with the last lines of its
 * traceback), a bad value it refused, a program that died, broke the protocol or answered late.
 */
import { PluginError } from '../errors.js';
import { ProcessFaultError, type HangReport } from '../definitions/process-connection.js';

/** What the helper sends when a call into the user's code failed (python/reckon_bridge.py). */
export interface HelperError {
  readonly index: number;
  readonly step: number;
  readonly call: string;
  readonly what: string;
  readonly message: string;
  readonly traceback?: readonly string[];
}

/** Where a command of a message ran: its episode and step. */
export type PlaceOf = (index: number, step: number) => { episode: number; step: number };

const CALLS: Record<string, string> = {
  reset: 'the environment (reset)',
  step: 'the environment (step)',
  state_name: 'the environment (state_name)',
  make_env: 'the environment (make_env)',
  act: 'the policy',
  probabilities: 'the policy (probabilities)',
  make_policy: 'the policy (make_policy)',
};

function withTraceback(message: string, traceback: readonly string[] | undefined): Error {
  return new Error(traceback && traceback.length ? `${message}\n    ${traceback.join('\n    ')}` : message);
}

export function helperFailure(error: HelperError, placeOf: PlaceOf, label: string): PluginError {
  const place = placeOf(error.index ?? 0, error.step ?? -1);
  const plugin = CALLS[error.call] ?? `the environment (${label})`;
  return new PluginError(plugin, place.episode, place.step, withTraceback(error.message, error.traceback), error.what ?? 'threw');
}

/**
 * A fault of the program itself (it died, printed stray text, answered late). A program that
 * answers late is asked where it is; one that died cannot say, so the message names the
 * episodes it was working on (`span`, e.g. "episodes 32 to 159"), and the error's episode is
 * the first of them.
 */
export function processFailure(e: unknown, placeOf: PlaceOf, fallback: { episode: number; step: number }, label: string, span: string): unknown {
  if (!(e instanceof ProcessFaultError)) return e;
  const fault = e.fault;
  const plugin = `the environment (${label})`;
  if (fault.kind === 'late') {
    const hung: HangReport | null = fault.hung;
    const place = hung ? placeOf(hung.index, hung.step) : fallback;
    const where = hung && hung.traceback.length ? withTraceback(`${e.message}; it was here:`, hung.traceback) : e;
    return new PluginError((hung?.call && CALLS[hung.call]) || plugin, place.episode, place.step, where, 'hung');
  }
  const what = fault.kind === 'garbage' ? 'broke the protocol' : 'died';
  const error = new PluginError(plugin, fallback.episode, fallback.step, e, what);
  error.message = `${plugin} ${what} while running ${span}: ${e.message}`;
  return error;
}
