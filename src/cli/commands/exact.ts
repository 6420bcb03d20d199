import { loadEnvironmentFile, loadPolicyFile } from '../../definitions/index.js';
import { InputError } from '../../errors.js';
import { exactEvaluation } from '../../exact/index.js';
import { exactJson } from '../../report/exact-json.js';
import { exactRiskJson, exactRiskText } from '../../report/exact-risk-report.js';
import { exactRisk } from '../../exact/exact-risk.js';
import { riskRequestFrom } from '../../options/risk-options.js';
import { exactText } from '../../report/exact-text.js';
import { parseCommandArgs, required } from '../args.js';
import { parseOption } from '../../options/parse-option.js';

export const HELP = `reckon exact: the exact expected return of a policy on a finite environment

Computes, by backward recursion over the horizon, exactly what 'reckon estimate' samples
(value), the exact standard deviation of that return (std), every state's value (states),
and the untruncated value (value_infinite; null when the episode may never end).
Works for gridworld and tabular environments with uniform, table, epsilon, arrows
policies, and module policies that define probabilities(state).

Usage: reckon exact --env FILE --policy FILE [--start STATE] [--risk ...] [--json]

Options:
  --env FILE        gridworld or tabular environment definition
  --policy FILE     policy definition
  --start STATE     value of one state (e.g. "0,1") instead of the start distribution
  --risk            also the exact probability of ending in each terminal state and of
                    running the whole horizon, and, when the return takes at most 100,000
                    distinct values, its quantiles (--quantiles), worst-α mean (--tail) and
                    the probability of each --event, as for estimate
  --json            print one JSON object: value, std, states, value_infinite, ...
  -h, --help        this help

Examples:
  reckon exact --env envs/textbook/grid-5x5-portals.json --policy envs/textbook/uniform.json --start 0,1
  reckon exact --env envs/warehouse.json --policy envs/picker-careful.json --json
  reckon exact --env envs/warehouse.json --policy envs/picker-careful.json --risk --event 'return<12'
`;

const OPTIONS = {
  env: { type: 'string' },
  policy: { type: 'string' },
  start: { type: 'string' },
  json: { type: 'boolean' },
  'no-store': { type: 'boolean' },
  risk: { type: 'boolean' },
  quantiles: { type: 'string' },
  tail: { type: 'string' },
  event: { type: 'string', multiple: true },
} as const;

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('exact', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const envPath = required('exact', 'env', values.env, '--env envs/warehouse.json');
  const policyPath = required('exact', 'policy', values.policy, '--policy envs/picker-direct.json');
  const env = await loadEnvironmentFile(envPath);
  if (env.built.kind !== 'finite') {
    throw new InputError(envPath, "is a code (module) environment; exact values exist only for gridworld and tabular ones: use 'reckon estimate'");
  }
  const mdp = env.built.mdp;
  const policy = await loadPolicyFile(policyPath, env.built);
  const matrix = policy.built.matrix;
  if (!matrix) {
    throw new InputError(policyPath, "is a code policy without probabilities(state), so it cannot be evaluated exactly: add probabilities(state) or use 'reckon estimate'");
  }
  let start: number | undefined;
  if (values.start !== undefined) {
    const name = parseOption('start', 'start', values.start);
    start = mdp.stateIndex.get(name);
    if (start === undefined) {
      throw new InputError('--start', `"${name}" is not a state of ${envPath} (states look like ${mdp.stateNames.slice(0, 4).map((n) => `"${n}"`).join(', ')})`);
    }
  }
  const riskRequest = riskRequestFrom(values);
  const result = exactEvaluation(mdp, matrix, { start });
  const risk = riskRequest ? exactRisk(mdp, matrix, start, riskRequest) : null;
  const labels = { env: envPath, policy: policyPath, start: values.start ?? null };
  if (values.json) process.stdout.write(`${JSON.stringify({ ...exactJson(mdp, result, labels), ...(risk ? { risk: exactRiskJson(mdp, risk) } : {}) }, null, 2)}\n`);
  else process.stdout.write(exactText(mdp, result, labels) + (risk ? exactRiskText(mdp, risk) : ''));
  return 0;
}
