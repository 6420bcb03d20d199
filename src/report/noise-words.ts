import type { NoiseMode } from '../engine/noise.js';

/** How reports name a run's noise mode, with the option that repeats it. */
export const NOISE_WORDS: Record<NoiseMode, string> = {
  step: 'noise keyed by step (--noise step)',
  visit: 'noise keyed by state visit (--noise visit)',
};
