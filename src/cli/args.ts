import { parseArgs, type ParseArgsConfig } from 'node:util';
import { InputError } from '../errors.js';

export type OptionSpec = NonNullable<ParseArgsConfig['options']>;

/**
 * Strict option parsing for one command: an unknown or malformed option is an InputError
 * that names it and points to the command's --help.
 */
export type OptionValues<T extends OptionSpec> = {
  [K in keyof T]?: T[K] extends { type: 'boolean' } ? boolean : string;
} & { help?: boolean };

export function parseCommandArgs<T extends OptionSpec>(
  command: string,
  args: string[],
  options: T,
  allowPositionals = false,
): { values: OptionValues<T>; positionals: string[] } {
  try {
    const parsed = parseArgs({ args, options: { ...options, help: { type: 'boolean', short: 'h' } }, strict: true, allowPositionals });
    return { values: parsed.values as OptionValues<T>, positionals: parsed.positionals };
  } catch (e) {
    const message = (e as Error).message
      .replace(/\. To specify a positional argument.*$/s, '')
      .replace(/\s*\n\s*/g, ' ')
      .replace(/\.$/, '');
    throw new InputError('', `${message}; see 'reckon ${command} --help'`);
  }
}

/** Requires an option, with a message that says what to give. */
export function required(command: string, name: string, value: string | undefined, example: string): string {
  if (value === undefined || value === '') {
    throw new InputError(`--${name}`, `is required; e.g. ${example} (see 'reckon ${command} --help')`);
  }
  return value;
}
