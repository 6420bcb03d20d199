/**
 * Worker-thread entry for a finite MDP with a tabulated policy: it is handed the compiled
 * tables (the pool built them once) instead of the definition files, so it loads only the
 * rollout loop, not the definitions layer, and starts in a few milliseconds rather than
 * the few hundred that parsing and validation cost. Same messages as worker.ts.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { PolicyMatrix } from '../definitions/finite-mdp.js';
import { rolloutFinite, type RolloutTables } from './finite-rollout.js';
import { serveBlocks } from './worker-loop.js';
import type { NoiseMode } from './noise.js';
import { rolloutFiniteVisit } from './visit-rollout.js';

/** What the pool sends a table worker (structured-cloned: typed arrays and numbers only). */
export interface TableWorkerData {
  readonly mdp: RolloutTables;
  readonly policy: PolicyMatrix;
  readonly seed: number;
  /** A fixed start state's index, or -1 for the start distribution. */
  readonly start: number;
  readonly noise: NoiseMode;
}

const port = parentPort;
if (!port) throw new Error('table-worker.js must run as a worker thread');
const { mdp, policy, seed, start, noise } = workerData as TableWorkerData;
const rollout = noise === 'visit' ? rolloutFiniteVisit : rolloutFinite;

serveBlocks(port, (block) => rollout(mdp, policy, seed, start, block));
