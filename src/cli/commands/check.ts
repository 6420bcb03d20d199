import { loadEnvironmentFile, loadPolicyFile } from '../../definitions/index.js';
import { startSupport } from '../../engine/finite-rollout.js';
import { environmentFacts } from '../../evaluate/environment-facts.js';
import { sig } from '../../report/format.js';
import { parseCommandArgs, required } from '../args.js';
import { finiteWarnings } from '../../evaluate/finite-warnings.js';
import { InputError } from '../../errors.js';

export const HELP = `reckon check: validate definition files and summarise the environment

Usage: reckon check --env FILE [--policy FILE] [--start STATE] [--json]

Prints the states, actions, start states, terminals, reward range, horizon and the exact
bounds on any return (over all policies, or under --policy). Exit code 2 with a one-line
message naming the file and the place when a definition is wrong. Valid files that are
probably not what was meant get warnings (exit code 0): a start state that is terminal, a
policy that only ever stays in place somewhere, no terminal reachable from the start.

Examples:
  reckon check --env envs/warehouse.json
  reckon check --env envs/warehouse.json --policy envs/picker-careful.json
`;

const OPTIONS = { env: { type: 'string' }, policy: { type: 'string' }, start: { type: 'string' }, json: { type: 'boolean' } } as const;

function list(items: readonly string[], max = 8): string {
  const names = items.map((n) => (n.includes(',') ? `"${n}"` : n));
  return names.length <= max ? names.join(', ') : `${names.slice(0, max).join(', ')}, … (${names.length} in all)`;
}

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('check', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const envPath = required('check', 'env', values.env, '--env envs/warehouse.json');
  const env = await loadEnvironmentFile(envPath);
  const policy = values.policy === undefined ? null : await loadPolicyFile(values.policy, env.built);
  const facts = environmentFacts(env.built, policy?.built ?? null);
  const summary: Record<string, unknown> = {
    env: envPath,
    policy: values.policy ?? null,
    kind: env.definition.kind,
    actions: facts.actions,
    states: facts.states,
    discount: facts.discount,
    horizon: facts.horizon,
    horizon_derived: facts.horizonDerived,
    reward_range: facts.rewardRange,
    return_bounds: facts.returnBounds,
    truncation_bound: facts.truncationBound,
  };
  if (env.built.kind === 'finite') {
    const mdp = env.built.mdp;
    const support = startSupport(mdp);
    summary.start = Object.fromEntries(Array.from(support.states, (s) => [mdp.stateNames[s], mdp.startProbability[s]]));
    summary.terminals = mdp.stateNames.filter((_, s) => mdp.terminal[s] === 1);
    let start: number | null = null;
    if (values.start !== undefined) {
      const found = mdp.stateIndex.get(values.start);
      if (found === undefined) throw new InputError('--start', `"${values.start}" is not a state of ${envPath} (states look like ${mdp.stateNames.slice(0, 4).map((n) => `"${n}"`).join(', ')})`);
      start = found;
    }
    const matrix = policy?.built.matrix ?? null;
    summary.warnings = policy !== null && matrix === null ? [] : finiteWarnings(mdp, matrix, start);
  } else {
    summary.warnings = [];
  }
  if (values.json) {
    process.stdout.write(`${JSON.stringify(summary, null, 2)}\n`);
    return 0;
  }
  const lines = [`${envPath}: valid ${env.definition.kind} environment${values.policy ? `; ${values.policy}: valid policy` : ''}`, ''];
  if (facts.states !== null) lines.push(`  states         ${facts.states}`);
  lines.push(`  actions        ${list(facts.actions)}`);
  if (summary.start) lines.push(`  start          ${list(Object.keys(summary.start as object))}`);
  if (summary.terminals) lines.push(`  terminals      ${list(summary.terminals as string[]) || 'none'}`);
  lines.push(`  discount       ${facts.discount}; horizon ${facts.horizon}${facts.horizonDerived ? ' (derived from the truncation tolerance)' : ''}`);
  if (facts.truncationBound !== null) {
    lines.push(
      facts.horizonDerived
        ? `  truncation     cutting episodes at the horizon moves the value by at most ${sig(facts.truncationBound, 2)}`
        : `  truncation     if the task has no time limit at ${facts.horizon} steps, the untruncated value may differ by up to ${sig(facts.truncationBound, 2)}`,
    );
  }
  lines.push(`  rewards        ${facts.rewardRange ? `${sig(facts.rewardRange[0])} … ${sig(facts.rewardRange[1])} a step` : 'range not declared'}`);
  lines.push(
    `  return bounds  ${facts.returnBounds ? `${sig(facts.returnBounds[0])} … ${sig(facts.returnBounds[1])}${policy ? ' under this policy' : ' over all policies'}` : 'unknown (give --bounds to estimate for hoeffding/bernstein)'}`,
  );
  const warnings = summary.warnings as string[];
  if (warnings.length > 0) lines.push('', '  warnings', ...warnings.map((w) => `    - ${w}`));
  process.stdout.write(lines.join('\n') + '\n');
  return 0;
}
