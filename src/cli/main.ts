#!/usr/bin/env node
/**
 * The `reckon` command: dispatches to one module per command, loaded on demand so that
 * `reckon --help` starts fast. Exit codes: 0 success, 2 bad input or usage, 1 internal error.
 */
import { InputError } from '../errors.js';
import { asStoreDamage } from '../store/damage.js';

interface Command {
  run(args: string[]): Promise<number | void>;
}

const COMMANDS: Record<string, { summary: string; load: () => Promise<Command> }> = {
  estimate: { summary: 'Monte Carlo estimate of a policy\'s expected return, with an interval and projections', load: () => import('./commands/estimate.js') },
  exact: { summary: 'exact value and return std of a policy on a finite environment (the oracle)', load: () => import('./commands/exact.js') },
  compare: { summary: 'compare policies on the same episodes (common random numbers): differences, p-values, ranking', load: () => import('./commands/compare.js') },
  offpolicy: { summary: 'estimate a target policy\'s return from episodes logged under another (importance sampling)', load: () => import('./commands/offpolicy.js') },
  plan: { summary: 'project the episodes and time a target error or a comparison needs, from a short pilot', load: () => import('./commands/plan.js') },
  check: { summary: 'validate definition files and summarise the environment', load: () => import('./commands/check.js') },
  runs: { summary: 'list, show (re-analyse), label, compare, export, resume, delete, merge and check stored runs', load: () => import('./commands/runs.js') },
  serve: { summary: 'review stored runs in a web page (plots, live progress) and start evaluations over HTTP', load: () => import('./commands/serve.js') },
  new: { summary: 'write a commented starter environment or policy module (JavaScript or --ts) and its definition', load: () => import('./commands/new.js') },
  demo: { summary: 'evaluate the bundled warehouse demo (what `npm start` runs)', load: () => import('./commands/demo.js') },
};

const TOP_HELP = `reckon: how good is this policy, how sure are we, and how many more episodes would settle it?

Usage: reckon <command> [options]     (reckon <command> --help for each)

Commands:
${Object.entries(COMMANDS)
  .map(([name, c]) => `  ${name.padEnd(10)}${c.summary}`)
  .join('\n')}

Examples:
  reckon check --env envs/warehouse.json --policy envs/picker-direct.json
  reckon estimate --env envs/warehouse.json --policy envs/picker-direct.json --episodes 20000 --seed 7
  reckon exact --env envs/warehouse.json --policy envs/picker-direct.json

Exit codes: 0 success, 2 bad input or usage, 1 internal error (RECKON_DEBUG=1 shows the stack).
`;

function closest(word: string, options: string[]): string | undefined {
  return options.find((o) => o.startsWith(word.slice(0, 2)));
}

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    process.stdout.write(TOP_HELP);
    return name === undefined ? 2 : 0;
  }
  if (name === '--version' || name === '-v') {
    const { version } = await import('./version.js');
    process.stdout.write(`${version()}\n`);
    return 0;
  }
  const command = COMMANDS[name];
  if (!command) {
    const guess = closest(name, Object.keys(COMMANDS));
    throw new InputError('', `unknown command "${name}"${guess ? ` (did you mean "${guess}"?)` : ''}; see 'reckon --help'`);
  }
  const code = await (await command.load()).run(rest);
  return typeof code === 'number' ? code : 0;
}

// A reader that stops early (`reckon runs export ID | head`) is not an error.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(0);
  throw e;
});

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (thrown: unknown) => {
    const e = asStoreDamage(thrown);
    if (e instanceof InputError) {
      process.stderr.write(`reckon: ${e.message}\n`);
      process.exitCode = e.exitCode;
    } else if (e instanceof Error && e.name === 'PluginError') {
      process.stderr.write(`reckon: ${e.message} (the same --seed replays it)\n`);
      if (process.env.RECKON_DEBUG === '1') process.stderr.write(`${e.stack}\n`);
      process.exitCode = 1;
    } else {
      const message = e instanceof Error ? e.message : String(e);
      process.stderr.write(`reckon: internal error: ${message}\n`);
      if (process.env.RECKON_DEBUG === '1' && e instanceof Error) process.stderr.write(`${e.stack}\n`);
      else process.stderr.write('(set RECKON_DEBUG=1 to see where)\n');
      process.exitCode = 1;
    }
    if (process.env.RECKON_DEBUG === '1' && e instanceof InputError) process.stderr.write(`${e.stack}\n`);
  },
);
