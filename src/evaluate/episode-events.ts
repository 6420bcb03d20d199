import { InputError } from '../errors.js';
import { describeTerminals, terminalsNamed } from '../definitions/terminal-states.js';
import { eventHappens, type EventSpec } from '../options/risk-options.js';
import type { EnvironmentFacts } from './environment-facts.js';

/** An event resolved against a run's environment: which terminal states a terminal event means. */
export interface EpisodeEvent {
  readonly spec: EventSpec;
  /** For a terminal event, the state indices it means (sorted); null for return and length events. */
  readonly states: readonly number[] | null;
}

/**
 * Resolves an event against the environment a run used, so a misspelt terminal is refused
 * before any episode runs: a terminal event needs a finite environment, and its name must be
 * a terminal cell's letter or a terminal state's name.
 */
export function resolveEvent(spec: EventSpec, facts: Pick<EnvironmentFacts, 'kind' | 'terminals'>, where = '--event'): EpisodeEvent {
  if (spec.subject !== 'terminal') return { spec, states: null };
  if (facts.kind !== 'finite') {
    throw new InputError(where, `"${spec.text}": terminal events need a finite environment (gridworld or tabular), whose states reckon can name; for a module environment use return<X or length>=H`);
  }
  if (!facts.terminals) {
    throw new InputError(where, `"${spec.text}": this run was stored before reckon recorded where episodes end; run it again to count terminal events`);
  }
  const states = terminalsNamed(spec.terminal!, facts.terminals);
  if (states.length === 0) {
    const known = facts.terminals.length === 0 ? 'this environment has no terminal states' : `its terminals are ${describeTerminals(facts.terminals)}`;
    throw new InputError(where, `"${spec.text}": no terminal cell letter or terminal state is named "${spec.terminal}"; ${known}`);
  }
  return { spec, states };
}

/** A test of one episode by its return, length and final state index, for a resolved event. */
export function episodeTest(event: EpisodeEvent): (ret: number, length: number, final: number) => boolean {
  const { spec, states } = event;
  if (spec.subject === 'return') return (ret) => eventHappens(spec, ret);
  if (spec.subject === 'length') return (_ret, length) => eventHappens(spec, length);
  const set = new Set(states);
  return (_ret, _length, final) => set.has(final);
}
