import path from 'node:path';
import Fastify, { type FastifyError, type FastifyInstance } from 'fastify';
import { defaultWorkers } from '../engine/pool.js';
import { InputError } from '../errors.js';
import { openStore } from '../store/open.js';
import { requestGate } from './auth.js';
import type { ServerContext } from './context.js';
import { RunAnalysisCache } from './run-analysis.js';
import { RunQueue } from './run-queue.js';
import { EvaluationThreads } from './evaluation-threads.js';
import { comparisonRoutes } from './routes/comparisons.js';
import { offPolicyRoutes } from './routes/offpolicy.js';
import { evaluationRoutes } from './routes/evaluations.js';
import { eventRoutes } from './routes/events.js';
import { exampleRoutes } from './routes/examples.js';
import { pageRoutes } from './routes/page.js';
import { runDataRoutes } from './routes/run-data.js';
import { runRoutes } from './routes/runs.js';
import { annotationRoutes } from './routes/annotations.js';

export interface ServerOptions {
  /** The run store file (shared with the command line). */
  readonly storePath: string;
  /** Required on every request when set; without it the server must stay on loopback. */
  readonly token?: string | null;
  /** Runs at once (default 1) and runs waiting beyond those (default 8). */
  readonly concurrency?: number;
  readonly queueSize?: number;
  /** Worker threads per run (default: all cores). */
  readonly workers?: number;
  /** Most episodes a request may ask for (default 10,000,000). */
  readonly maxEpisodes?: number;
  /** Largest request body in bytes (default 1 MB). */
  readonly bodyLimit?: number;
  readonly toolVersion: string;
  readonly logger?: boolean;
}

/**
 * The review server as a Fastify instance that has not started listening: `reckon serve`
 * listens, the tests call `inject`. Closing it stops its runs (they are left interrupted,
 * resumable with `reckon runs resume`) and closes the store.
 */
export async function buildApp(options: ServerOptions): Promise<FastifyInstance> {
  const app = Fastify({ logger: options.logger ?? false, bodyLimit: options.bodyLimit ?? 1024 * 1024 });
  const db = openStore(options.storePath);
  const concurrency = options.concurrency ?? 1;
  const ctx: ServerContext = {
    db,
    storePath: options.storePath,
    queue: new RunQueue(concurrency, options.queueSize ?? 8),
    limits: {
      maxEpisodes: options.maxEpisodes ?? 10_000_000,
      workers: options.workers ?? defaultWorkers(),
      baseDir: path.dirname(path.resolve(options.storePath)),
    },
    analysis: new RunAnalysisCache(db),
    toolVersion: options.toolVersion,
    threads: new EvaluationThreads({ storePath: options.storePath, toolVersion: options.toolVersion }, concurrency),
  };

  app.addHook('onRequest', requestGate(options.token ?? null));
  // JSON bodies only: a form on another site can post text/plain without asking, not JSON (415).
  app.removeContentTypeParser('text/plain');
  app.setErrorHandler((error: FastifyError, request, reply) => {
    if (error instanceof InputError) return reply.code(error.httpStatus).send({ error: error.message });
    const status = error.statusCode ?? 500;
    if (status < 500) return reply.code(status).send({ error: error.message });
    request.log.error(error);
    return reply.code(500).send({ error: `internal error: ${error.message}` });
  });
  app.setNotFoundHandler((request, reply) => reply.code(404).send({ error: `${request.method} ${request.url.split('?')[0]}: no such page or endpoint` }));

  runRoutes(app, ctx);
  annotationRoutes(app, ctx);
  runDataRoutes(app, ctx);
  eventRoutes(app, ctx);
  evaluationRoutes(app, ctx);
  comparisonRoutes(app, ctx);
  offPolicyRoutes(app, ctx);
  exampleRoutes(app);
  pageRoutes(app);

  app.addHook('onClose', async () => {
    await ctx.queue.close();
    await ctx.threads.close();
    db.close();
  });
  return app;
}
