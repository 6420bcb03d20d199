import { parseArgs, type ParseArgsConfig } from 'node:util';
import { InputError } from '../errors.js';

export type OptionSpec = NonNullable<ParseArgsConfig['options']>;

/**
 * Strict option parsing for one command: an unknown or malformed option is an InputError
 * that names it and points to the command's --help.
 */
export type OptionValues<T extends OptionSpec> = {
  [K in keyof T]?: T[K] extends { type: 'boolean' } ? boolean : T[K] extends { multiple: true } ? string[] : string;
} & { help?: boolean };

export function parseCommandArgs<T extends OptionSpec>(
  command: string,
  args: string[],
  options: T,
  allowPositionals = false,
): { values: OptionValues<T>; positionals: string[] } {
  try {
    const parsed = parseArgs({ args: joinNegativeValues(args, options), options: { ...options, help: { type: 'boolean', short: 'h' } }, strict: true, allowPositionals });
    return { values: parsed.values as OptionValues<T>, positionals: parsed.positionals };
  } catch (e) {
    const message = (e as Error).message
      .replace(/\. To specify a positional argument.*$/s, '')
      .replace(/\s*\n\s*/g, ' ')
      .replace(/\.$/, '');
    throw new InputError('', `${message}; see 'reckon ${command} --help'`);
  }
}

/**
 * `--bounds -10,5` and `--seed -3`: a value that starts with a minus sign and a digit is the
 * option's value, not another option (negative lower bounds are the common case). Joined
 * into `--bounds=-10,5` so the parser takes it as the value; the option's own check then
 * judges it.
 */
export function joinNegativeValues(args: readonly string[], options: OptionSpec): string[] {
  const out: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const arg = args[i];
    const name = arg.startsWith('--') && !arg.includes('=') ? arg.slice(2) : null;
    const next = args[i + 1];
    if (name !== null && options[name]?.type === 'string' && next !== undefined && /^-(\d|\.\d)/.test(next)) {
      out.push(`${arg}=${next}`);
      i++;
    } else {
      out.push(arg);
    }
  }
  return out;
}

/** Requires an option, with a message that says what to give. */
export function required(command: string, name: string, value: string | undefined, example: string): string {
  if (value === undefined || value === '') {
    throw new InputError(`--${name}`, `is required; e.g. ${example} (see 'reckon ${command} --help')`);
  }
  return value;
}
