import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { readDefinitionFile } from '../../definitions/index.js';
import { defaultWorkers } from '../../engine/pool.js';
import { runStoredEstimate } from '../../evaluate/stored-estimate.js';
import { defaultStorePath } from '../../store/location.js';
import { openStore } from '../../store/open.js';
import { version } from '../version.js';
import { estimateText } from '../../report/estimate-text.js';
import { ProgressLine } from '../progress.js';

export const HELP = `reckon demo: the bundled warehouse picking robot (what 'npm start' runs)

Estimates two policies for the robot in envs/warehouse.json with a fixed seed, checks each
estimate against the exact value, and stores both runs (see 'reckon runs list'). See envs/README.md for the scenario.
The figures are statistical estimates about the modelled warehouse, not a safety case for a real one.

Usage: reckon demo
`;

/**
 * The demo is a robot beside a forklift lane, so its figures could be read as safety evidence;
 * the README's caution is repeated where they are printed.
 */
export const DEMO_CAUTION = [
  'Caution: these figures are statistical estimates about the modelled warehouse (the definition',
  'files), not evidence about a real robot or forklift lane, and not a safety case. For a physical',
  'system, follow the safety practice and standards that apply to it.',
].join('\n');

/** What `npm start` runs: the bundled warehouse scenario, two policies, checked against the oracle. */
export async function run(args: string[]): Promise<number> {
  if (args.includes('--help') || args.includes('-h')) {
    process.stdout.write(HELP);
    return 0;
  }
  const envs = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../envs');
  const rel = (f: string) => path.relative(process.cwd(), path.join(envs, f)) || f;
  const envPath = rel('warehouse.json');
  process.stdout.write('reckon demo: a warehouse picking robot, two routes to the packing station (envs/README.md)\n\n');
  process.stdout.write(`${DEMO_CAUTION}\n\n`);
  const storePath = defaultStorePath();
  const db = openStore(storePath);
  try {
  for (const policyFile of ['picker-direct.json', 'picker-careful.json']) {
    const policyPath = rel(policyFile);
    const progress = new ProgressLine();
    const { result, runId } = await runStoredEstimate({
      db,
      spec: { env: readDefinitionFile(envPath), policy: readDefinitionFile(policyPath), seed: 1, start: null, noise: 'step' },
      options: { episodes: 50000, workers: defaultWorkers(), method: 't', level: 0.95, bounds: null, targetError: null, sigma: null },
      toolVersion: version(),
      shard: null,
      first: 0,
      onProgress: (p) => progress.update(p),
    });
    progress.clear();
    process.stdout.write(estimateText(result, { env: envPath, policy: policyPath }));
    process.stdout.write('\n');
    process.stdout.write(`  stored as run    ${runId} ('reckon runs show ${runId}')\n\n`);
  }
  } finally {
    db.close();
  }
  process.stdout.write(
    [
      DEMO_CAUTION,
      '',
      'Next:',
      `  reckon estimate --env ${envPath} --policy ${rel('picker-careful.json')} --start 2,0 --seed 7`,
      `  reckon exact --env ${envPath} --policy ${rel('picker-direct.json')}`,
      `  reckon runs list        (these runs are kept in ${storePath})`,
      `  reckon estimate --env ${rel('restock-env.json')} --policy ${rel('restock-base-stock.json')} --seed 3`,
      '',
    ].join('\n'),
  );
  return 0;
}
