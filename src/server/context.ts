import type { Db } from '../store/open.js';
import type { ServerLimits } from './evaluation-request.js';
import type { RunQueue } from './run-queue.js';
import type { RunAnalysisCache } from './run-analysis.js';
import type { EvaluationThreads } from './evaluation-threads.js';

/** What every route needs: the store, the queue of runs and the server's limits. */
export interface ServerContext {
  readonly db: Db;
  readonly storePath: string;
  readonly queue: RunQueue;
  readonly limits: ServerLimits;
  readonly analysis: RunAnalysisCache;
  readonly toolVersion: string;
  /** The evaluation threads, kept warm between runs. */
  readonly threads: EvaluationThreads;
}
