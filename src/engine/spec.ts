import type { DefinitionSource } from '../definitions/built.js';
import type { NoiseMode } from './noise.js';

/**
 * Everything that determines a run's episodes, in a form that crosses thread and process
 * boundaries (plain JSON): the definitions as given, where they came from, the seed and the
 * optional fixed start state, and how draws are addressed. Episode i's return is a pure
 * function of (spec, i).
 */
export interface RolloutSpec {
  readonly env: { readonly json: unknown; readonly source: DefinitionSource };
  readonly policy: { readonly json: unknown; readonly source: DefinitionSource };
  readonly seed: number;
  /** A state name for `--start`, or null for the environment's start distribution. */
  readonly start: string | null;
  /** How draws are addressed (engine/noise.ts): by step (the default of estimate) or by state visit. */
  readonly noise: NoiseMode;
}
