import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { run as estimate } from './estimate.js';

/** What `npm start` runs: the bundled warehouse scenario, with a fixed seed. */
export async function run(args: string[]): Promise<number> {
  if (args.includes('--help') || args.includes('-h')) {
    process.stdout.write('reckon demo: estimate the bundled warehouse picking policy (envs/warehouse.json) with seed 1.\nUsage: reckon demo [estimate options]\n');
    return 0;
  }
  const envs = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../envs');
  const rel = (f: string) => path.relative(process.cwd(), path.join(envs, f)) || f;
  process.stdout.write('reckon demo: the warehouse picking robot, direct route (see envs/README.md)\n\n');
  return estimate(['--env', rel('warehouse.json'), '--policy', rel('picker-direct.json'), '--episodes', '50000', '--seed', '1', ...args]);
}
