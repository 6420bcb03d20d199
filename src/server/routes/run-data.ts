import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { InputError, NotFoundError } from '../../errors.js';
import { storedRunSequence } from '../../evaluate/stored-estimate.js';
import { RUN_PLOT_KINDS, runPlotSpec, type RunPlotKind } from '../../report/plots/run-plots.js';
import type { ServerContext } from '../context.js';
import { queryOptions } from '../query.js';
import { findStoredRun, isSettled } from './runs.js';

const pointsSchema = z
  .string()
  .regex(/^\d+$/, { message: 'must be a whole number of points, e.g. 500' })
  .transform(Number)
  .refine((n) => n >= 2 && n <= 1_000_000, { message: 'must be between 2 and 1000000' });

/** Every `stride`-th episode (from the first), enough for a plot of `points` points. */
export function strided(returns: Float64Array, lengths: Uint32Array, points: number | null) {
  const n = returns.length;
  const stride = points === null || n <= points ? 1 : Math.ceil(n / points);
  const count = Math.ceil(n / stride);
  const index: number[] = new Array(count);
  const ret: number[] = new Array(count);
  const len: number[] = new Array(count);
  for (let k = 0; k < count; k++) {
    const i = k * stride;
    index[k] = i;
    ret[k] = returns[i];
    len[k] = lengths[i];
  }
  return { stride, index, ret, len };
}

/**
 * `GET /api/runs/:id/returns` (per-episode returns and lengths; `?points=N` keeps every k-th
 * episode so at most N remain) and `GET /api/runs/:id/plots/:kind` (the Vega-Lite spec the
 * page draws and `reckon runs plot` renders).
 */
export function runDataRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.get<{ Params: { id: string } }>('/api/runs/:id/returns', async (request) => {
    const q = queryOptions(request.query, ['points']);
    let points: number | null = null;
    if (q.points !== undefined) {
      const parsed = pointsSchema.safeParse(q.points);
      if (!parsed.success) throw new InputError('?points', `${parsed.error.issues[0].message} (got "${q.points}")`);
      points = parsed.data;
    }
    const run = findStoredRun(ctx, request.params.id);
    const { returns, lengths } = ctx.analysis.episodes(run, isSettled(ctx, run));
    const sample = strided(returns, lengths, points);
    return {
      run_id: run.id,
      first_episode: run.firstEpisode,
      episodes: returns.length,
      stride: sample.stride,
      episode: sample.index.map((i) => run.firstEpisode + i),
      return: sample.ret,
      length: sample.len,
    };
  });

  app.get<{ Params: { id: string; kind: string } }>('/api/runs/:id/plots/:kind', async (request) => {
    const q = queryOptions(request.query, ['confidence', 'arrows']);
    if (q.arrows !== undefined && q.arrows !== 'true' && q.arrows !== 'false') throw new InputError('arrows', `must be true or false (got "${q.arrows}")`);
    const kind = request.params.kind;
    if (!(RUN_PLOT_KINDS as readonly string[]).includes(kind)) {
      throw new NotFoundError(`plot "${kind}"`, `is not a plot; choose ${RUN_PLOT_KINDS.join(', ')}`);
    }
    const run = findStoredRun(ctx, request.params.id);
    const stored = run.options as { level?: number };
    const level = q.confidence === undefined ? (stored.level ?? 0.95) : z.coerce.number().gt(0).lt(1).parse(q.confidence);
    const { returns, lengths } = ctx.analysis.episodes(run, isSettled(ctx, run));
    const exact = kind === 'convergence' || kind === 'value-map' ? await ctx.analysis.exact(run) : null;
    const sequence = kind === 'convergence' ? storedRunSequence(run, level) : null;
    const spec = runPlotSpec(kind as RunPlotKind, { runId: run.id, envLabel: run.env.label, policyLabel: run.policy.label, level, returns, lengths, exact, sequence, arrows: q.arrows === 'true' });
    if (spec === null) throw new NotFoundError(`plot "${kind}"`, `does not apply to run ${run.id} (a value map needs a gridworld and a policy with known probabilities)`);
    return spec;
  });
}
