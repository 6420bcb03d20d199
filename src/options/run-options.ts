import { randomInt } from 'node:crypto';
import { defaultWorkers } from '../engine/pool.js';
import { parseOption } from './parse-option.js';
import { DEFAULT_STEP_TIMEOUT_SECONDS } from '../engine/step-watch.js';

/** The option texts every command that runs episodes shares. */
export interface RunOptionTexts {
  seed?: string;
  workers?: string;
  confidence?: string;
  bounds?: string;
  sigma?: string;
  start?: string;
  'step-timeout'?: string;
}

export interface RunOptions {
  /** The seed, random when not given (the caller prints it so the run can be repeated). */
  readonly seed: number;
  readonly seedGiven: boolean;
  readonly workers: number;
  readonly level: number;
  readonly bounds: [number, number] | null;
  readonly sigma: number | null;
  readonly start: string | null;
  /** Seconds one call into a plug-in may take (`--step-timeout`). */
  readonly stepTimeout: number;
}

/** Parses the shared options with their defaults: one place for estimate, compare and plan. */
export function parseRunOptions(values: RunOptionTexts): RunOptions {
  return {
    seed: values.seed === undefined ? randomInt(0, 2 ** 31) : parseOption('seed', 'seed', values.seed),
    seedGiven: values.seed !== undefined,
    workers: values.workers === undefined ? defaultWorkers() : parseOption('workers', 'workers', values.workers),
    level: values.confidence === undefined ? 0.95 : parseOption('confidence', 'confidence', values.confidence),
    bounds: values.bounds === undefined ? null : parseOption('bounds', 'bounds', values.bounds),
    sigma: values.sigma === undefined ? null : parseOption('sigma', 'sigma', values.sigma),
    start: values.start === undefined ? null : parseOption('start', 'start', values.start),
    stepTimeout: values['step-timeout'] === undefined ? DEFAULT_STEP_TIMEOUT_SECONDS : parseOption('step-timeout', 'stepTimeout', values['step-timeout']),
  };
}
