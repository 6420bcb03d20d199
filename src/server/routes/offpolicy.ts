import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { FastifyInstance } from 'fastify';
import { InputError } from '../../errors.js';
import { OFFPOLICY_BODY_LIMIT, offPolicyFieldOf, planOffPolicy, type OffPolicyTask } from '../offpolicy-request.js';
import type { FromOffPolicyWorker, OffPolicyWorkerData } from '../offpolicy-worker.js';
import { offPolicyWeightsSpec } from '../../report/plots/offpolicy-weights.js';
import { loadOffPolicyLog } from '../../store/offpolicy-runs.js';
import { runKindPhrase } from '../../store/runs.js';
import type { ServerContext } from '../context.js';
import { queryOptions } from '../query.js';
import { findStoredRun } from './runs.js';
import { annotationsJson } from '../../report/run-json.js';
import { provenanceJson } from '../../report/provenance.js';

function workerUrl(): string {
  const here = fileURLToPath(import.meta.url);
  // Under the test runner this file is TypeScript source; the worker always runs the build.
  if (here.endsWith('.ts')) return path.resolve(path.dirname(here), '../../../dist/server/offpolicy-worker.js');
  return path.resolve(path.dirname(here), '../offpolicy-worker.js');
}

/** Runs one off-policy task on its own thread; resolves with what the thread reports. */
function runOffPolicyThread(data: OffPolicyWorkerData): Promise<FromOffPolicyWorker> {
  return new Promise((resolve) => {
    const worker = new Worker(workerUrl(), { workerData: data });
    let answered = false;
    const answer = (message: FromOffPolicyWorker) => {
      if (answered) return;
      answered = true;
      resolve(message);
    };
    worker.on('message', answer);
    worker.on('error', (e) => answer({ type: 'failed', error: e.message, input: null }));
    worker.on('exit', () => answer({ type: 'failed', error: 'the off-policy thread stopped unexpectedly', input: null }));
  });
}

/**
 * `POST /api/offpolicy`: an off-policy evaluation from a log sent in the body (its JSON Lines
 * text) and inline definitions (no code, no paths, as for evaluations). It holds a place in
 * the run queue (429 when full) while a thread of its own evaluates and stores it, then
 * answers 201 with what `offpolicy --json` prints, or 400 with the command line's message.
 *
 * `GET /api/offpolicy/:id`: what `runs show ID --json` prints for an off-policy run (its
 * estimators, bounds and diagnostics as computed when it ran), and `…/plot`: the histogram of
 * the episodes' importance weights, whose mean should be 1.
 */
export function offPolicyRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.post('/api/offpolicy', { bodyLimit: OFFPOLICY_BODY_LIMIT }, async (request, reply) => {
    let task: OffPolicyTask;
    try {
      task = planOffPolicy(request.body);
    } catch (e) {
      if (e instanceof InputError) {
        const field = e.where === 'request' ? null : offPolicyFieldOf(e, { log: 'log', policy: 'policy', env: 'env', behaviour: 'behaviour' });
        return reply.code(e.httpStatus).send({ error: e.message, field });
      }
      throw e;
    }
    const place = ctx.queue.reserve();
    if (place === null) {
      const { running, waiting } = ctx.queue.size;
      return reply.code(429).header('retry-after', '5').send({ error: `the server is busy (${running} running, ${waiting} waiting, the most it holds); try again shortly` });
    }
    let outcome: FromOffPolicyWorker;
    try {
      outcome = await runOffPolicyThread({ storePath: ctx.storePath, baseDir: ctx.limits.baseDir, toolVersion: ctx.toolVersion, task });
    } finally {
      place.release();
    }
    if (outcome.type === 'done') return reply.code(201).header('location', `/api/offpolicy/${outcome.runId}`).send(outcome.json);
    if (outcome.input) {
      const error = new InputError(outcome.input.where, outcome.input.detail);
      return reply.code(error.httpStatus).send({ error: error.message, field: offPolicyFieldOf(error, task.labels) });
    }
    throw new Error(outcome.error);
  });

  const offPolicyRun = (id: string) => {
    const run = findStoredRun(ctx, id);
    if (run.kind !== 'offpolicy') throw new InputError(`run ${run.id}`, `is ${runKindPhrase(run.kind)}, not an off-policy one`);
    return run;
  };

  app.get<{ Params: { id: string } }>('/api/offpolicy/:id', async (request) => {
    queryOptions(request.query, []);
    const run = offPolicyRun(request.params.id);
    return { ...run.summary, run_id: run.id, status: run.status, created_at: run.createdAt, tool_version: run.toolVersion, machine: run.machine, ...annotationsJson(run), ...provenanceJson(run) };
  });

  app.get<{ Params: { id: string } }>('/api/offpolicy/:id/plot', async (request) => {
    queryOptions(request.query, []);
    const run = offPolicyRun(request.params.id);
    return ctx.analysis.remember(`offpolicy-plot|${run.id}`, () => {
      const log = loadOffPolicyLog(ctx.db, run.id);
      const weights = log?.weights ?? new Float64Array(0);
      return offPolicyWeightsSpec(weights, run.id);
    });
  });
}
