import type { NoiseMode } from '../engine/noise.js';
import { isCodeKind } from '../definitions/process-schema.js';
import { parseOption } from './parse-option.js';

/**
 * The default noise mode of each command. `estimate` keeps step-keyed draws, so a run repeated
 * with an older seed gives the older figures; `compare` uses the mode that makes paired
 * differences tighter (README, "Comparing policies", has the measurements behind the choice).
 */
export const DEFAULT_NOISE = { estimate: 'step', compare: 'step' } as const satisfies Record<string, NoiseMode>;

/**
 * `--noise` (command line) or `noise` (HTTP), checked by the one schema. Without it, the
 * command's default; a module or process environment, which visit noise cannot key, defaults to step.
 */
export function noiseMode(text: string | undefined, command: keyof typeof DEFAULT_NOISE, envJson: unknown): NoiseMode {
  if (text !== undefined) return parseOption('noise', 'noise', text);
  if (isCodeKind(envJson)) return 'step';
  return DEFAULT_NOISE[command];
}
