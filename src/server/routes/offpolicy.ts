import type { FastifyInstance } from 'fastify';
import { InputError } from '../../errors.js';
import { offPolicyWeightsSpec } from '../../report/plots/offpolicy-weights.js';
import { loadOffPolicyLog } from '../../store/offpolicy-runs.js';
import type { ServerContext } from '../context.js';
import { queryOptions } from '../query.js';
import { findStoredRun } from './runs.js';

/**
 * `GET /api/offpolicy/:id`: what `runs show ID --json` prints for an off-policy run (its
 * estimators, bounds and diagnostics as computed when it ran), and `…/plot`: the histogram of
 * the episodes' importance weights, whose mean should be 1.
 */
export function offPolicyRoutes(app: FastifyInstance, ctx: ServerContext): void {
  const offPolicyRun = (id: string) => {
    const run = findStoredRun(ctx, id);
    if (run.kind !== 'offpolicy') throw new InputError(`run ${run.id}`, `is a ${run.kind} run, not an off-policy one`);
    return run;
  };

  app.get<{ Params: { id: string } }>('/api/offpolicy/:id', async (request) => {
    queryOptions(request.query, []);
    const run = offPolicyRun(request.params.id);
    return { ...run.summary, run_id: run.id, status: run.status, created_at: run.createdAt, tool_version: run.toolVersion };
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
