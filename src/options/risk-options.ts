import { z } from 'zod';
import { InputError } from '../errors.js';

/** One event whose probability the risk report estimates. */
export interface EventSpec {
  /** As the user wrote it, e.g. "return<0". */
  readonly text: string;
  readonly subject: 'return' | 'length' | 'terminal';
  readonly relation: '<' | '<=' | '>' | '>=' | '=';
  /** The threshold of a return or length event (NaN for a terminal event). */
  readonly value: number;
  /** For a terminal event: the cell letter or state name the episode must end in. */
  readonly terminal?: string;
}

/** What `--risk` computes: the quantile levels, the tail fraction, the events. */
export interface RiskRequest {
  readonly quantiles: readonly number[];
  readonly tail: number;
  readonly events: readonly EventSpec[];
}

export const DEFAULT_QUANTILES = [0.05, 0.5, 0.95] as const;
export const DEFAULT_TAIL = 0.05;

const unitLevel = z.number().gt(0, { message: 'must be strictly between 0 and 1' }).lt(1, { message: 'must be strictly between 0 and 1' });
const EVENT = /^\s*(return|length)\s*(<=|>=|<|>|=)\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?)\s*$/i;

/** `--quantiles 0.05,0.5,0.95`: levels strictly inside (0, 1). */
export function parseQuantiles(text: string): number[] {
  const parts = text.split(',').map((p) => p.trim());
  const levels = parts.map((p) => Number(p));
  levels.forEach((level, k) => {
    if (parts[k] === '' || !unitLevel.safeParse(level).success) {
      throw new InputError('--quantiles', `each level must be a number strictly between 0 and 1, e.g. --quantiles 0.05,0.5,0.95 (got "${parts[k]}")`);
    }
  });
  return [...new Set(levels)].sort((a, b) => a - b);
}

/** `--tail 0.05`: the fraction of worst returns whose mean is reported. */
export function parseTail(text: string): number {
  const tail = Number(text);
  if (text.trim() === '' || !unitLevel.safeParse(tail).success) {
    throw new InputError('--tail', `must be a fraction strictly between 0 and 1, e.g. --tail 0.05 for the worst 5% (got "${text}")`);
  }
  return tail;
}

const TERMINAL_EVENT = /^\s*terminal\s*=(.*)$/i;

/** `--event 'return<0'`, `--event 'length>=200'` or `--event 'terminal=X'` (a cell letter or state name). */
export function parseEvent(text: string, where = '--event'): EventSpec {
  const terminal = TERMINAL_EVENT.exec(text);
  if (terminal) {
    const name = terminal[1].trim();
    if (name === '') throw new InputError(where, `"${text}" names no terminal; write terminal=X with a gridworld cell letter or a state name (e.g. --event 'terminal=P')`);
    return { text: `terminal=${name}`, subject: 'terminal', relation: '=', value: Number.NaN, terminal: name };
  }
  const match = EVENT.exec(text);
  if (!match) throw new InputError(where, `"${text}" is not an event; write return<X, return<=X, return>X, return>=X, length>=K, length=K or terminal=X (e.g. --event 'return<0')`);
  return { text: text.replace(/\s+/g, ''), subject: match[1].toLowerCase() as 'return' | 'length', relation: match[2] as EventSpec['relation'], value: Number(match[3]) };
}

/** Whether a value makes the event happen. */
export function eventHappens(event: EventSpec, value: number): boolean {
  switch (event.relation) {
    case '<':
      return value < event.value;
    case '<=':
      return value <= event.value;
    case '>':
      return value > event.value;
    case '>=':
      return value >= event.value;
    case '=':
      return value === event.value;
  }
}

/** The risk request from the command line's values, or null when none of its options was given. */
export function riskRequestFrom(values: { risk?: boolean; quantiles?: string; tail?: string; event?: string[] }): RiskRequest | null {
  if (!values.risk && values.quantiles === undefined && values.tail === undefined && !values.event?.length) return null;
  return {
    quantiles: values.quantiles === undefined ? [...DEFAULT_QUANTILES] : parseQuantiles(values.quantiles),
    tail: values.tail === undefined ? DEFAULT_TAIL : parseTail(values.tail),
    events: (values.event ?? []).map((text) => parseEvent(text)),
  };
}
