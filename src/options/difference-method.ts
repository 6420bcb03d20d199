import { InputError } from '../errors.js';
import { isSequenceMethod, SEQUENCE_METHODS, type SequenceChoice } from '../evaluate/sequence.js';
import type { DifferenceMethod } from '../stats/index.js';
import { parseOption } from './parse-option.js';

/**
 * The interval for a comparison's differences, from `--ci` (command line) or `ci` (HTTP):
 * a fixed-sample method for a fixed number of episodes, or a confidence sequence when the run
 * stops at a target error. One place, so both say the same.
 */
export function differenceMethod(ci: string | undefined, targetError: number | null): { method: DifferenceMethod; sequence: SequenceChoice | null } {
  if (ci === undefined) return { method: 't', sequence: null };
  const choice = parseOption('ci', 'interval', ci);
  if (isSequenceMethod(choice)) {
    if (targetError === null) throw new InputError('--ci', `${choice} is for runs that stop at a target error: add --target-error E`);
    return { method: 't', sequence: choice };
  }
  if (choice === 't' || choice === 'bootstrap' || choice === 'bootstrap-percentile') {
    if (targetError !== null) {
      throw new InputError('--ci', `"${choice}" is a fixed-sample interval, which loses its coverage when the run stops on the data; with --target-error use ${SEQUENCE_METHODS.join(', ')}`);
    }
    return { method: choice, sequence: null };
  }
  throw new InputError('--ci', `"${choice}" is not offered for differences; choose t, bootstrap or bootstrap-percentile`);
}
