import { offPolicyWeightsSpec } from '../../report/plots/offpolicy-weights.js';
import { loadOffPolicyLog } from '../../store/offpolicy-runs.js';
import { InputError } from '../../errors.js';
import { storedRunSequence } from '../../evaluate/stored-estimate.js';
import { exactForRun } from '../../report/plots/exact-for-run.js';
import { RUN_PLOT_KINDS, runPlotSpec, type RunPlotKind } from '../../report/plots/run-plots.js';
import { renderSvg } from '../../report/plots/svg.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { getRun, listMembers, loadEpisodes, runKindPhrase } from '../../store/runs.js';
import { writeOutputFile } from '../output-file.js';
import { parseCommandArgs } from '../args.js';
import { parseOption } from '../../options/parse-option.js';

/**
 * `reckon runs plot ID --out FILE.svg [--kind convergence|histogram|lengths|value-map|cdf] [--arrows]`: the
 * page's plot of a stored run as an SVG file, for papers and reports.
 */
export async function plot(args: string[], help: string): Promise<number> {
  const { values, positionals } = parseCommandArgs(
    'runs',
    args,
    { store: { type: 'string' }, out: { type: 'string' }, kind: { type: 'string' }, confidence: { type: 'string' }, arrows: { type: 'boolean' } },
    true,
  );
  if (values.help) {
    process.stdout.write(help);
    return 0;
  }
  if (positionals.length !== 1) throw new InputError('runs plot', `needs exactly one run id (got ${positionals.length}); see the ids with 'reckon runs list'`);
  if (!values.out) throw new InputError('--out', 'is required: the SVG file to write, e.g. --out convergence.svg');
  const kind = (values.kind ?? 'convergence') as RunPlotKind;
  if (!RUN_PLOT_KINDS.includes(kind)) throw new InputError('--kind', `must be one of ${RUN_PLOT_KINDS.join(', ')} (got "${values.kind}")`);
  if (values.arrows && kind !== 'value-map') throw new InputError('--arrows', `draws the policy's moves on a value map: add --kind value-map (got --kind ${kind})`);
  const storePath = values.store ?? defaultStorePath();
  const db = openStore(storePath, { readonly: true });
  let svg: string;
  try {
    const run = getRun(db, positionals[0], storePath);
    if (run.kind === 'offpolicy') {
      if (values.kind !== undefined && values.kind !== 'histogram') {
        throw new InputError('--kind', `an off-policy run has one plot, the histogram of its importance weights: leave out --kind or give --kind histogram (got "${values.kind}")`);
      }
      svg = await renderSvg(offPolicyWeightsSpec(loadOffPolicyLog(db, run.id)?.weights ?? new Float64Array(0), run.id));
      writeOutputFile('--out', values.out, svg);
      process.stdout.write(`Wrote the weight histogram of run ${run.id} to ${values.out}.\n`);
      return 0;
    }
    if (run.kind !== 'estimate') {
      const members = listMembers(db, run.id).map((m) => m.id);
      throw new InputError(`run ${run.id}`, `is ${runKindPhrase(run.kind)}; plot one of its member runs (${members.join(', ')}), e.g. 'reckon runs plot ${members[0]} --out ${values.out}'`);
    }
    const level = values.confidence === undefined ? ((run.options as { level?: number }).level ?? 0.95) : parseOption('confidence', 'confidence', values.confidence);
    const { returns, lengths } = loadEpisodes(db, run);
    if (returns.length < 2) throw new InputError(`run ${run.id}`, `has ${returns.length} stored episode(s), too few to plot`);
    const exact =
      kind === 'convergence' || kind === 'value-map'
        ? await exactForRun(
            { json: run.env.json, source: { label: run.env.label, baseDir: run.env.baseDir } },
            { json: run.policy.json, source: { label: run.policy.label, baseDir: run.policy.baseDir } },
            run.start,
          )
        : null;
    const sequence = kind === 'convergence' ? storedRunSequence(run, level) : null;
    const spec = runPlotSpec(kind, { runId: run.id, envLabel: run.env.label, policyLabel: run.policy.label, level, returns, lengths, exact, sequence, arrows: Boolean(values.arrows) });
    if (spec === null) throw new InputError('--kind', noValueMapReason(run.id, (run.env.json as { kind?: string }).kind ?? 'unknown', exact !== null));
    svg = await renderSvg(spec);
  } finally {
    db.close();
  }
  writeOutputFile('--out', values.out, svg);
  process.stdout.write(`Wrote the ${kind} plot of run ${positionals[0]} to ${values.out}.\n`);
  return 0;
}

/** Why a run has no value map, in the words of what the user can change. */
function noValueMapReason(id: string, envKind: string, exactKnown: boolean): string {
  if (envKind !== 'gridworld') {
    const more = envKind === 'tabular' ? "; 'reckon exact --env F --policy F' lists every state's value" : '';
    return `value-map draws a gridworld's layout, and run ${id}'s environment is ${envKind === 'module' ? 'code' : envKind}${more}`;
  }
  return exactKnown
    ? `run ${id} has no state values to draw`
    : `value-map needs the policy's action probabilities, and run ${id}'s policy is code without probabilities(state)`;
}
