import type { FastifyInstance } from 'fastify';
import { parseOption } from '../../options/parse-option.js';
import { riskRequestFrom } from '../../options/risk-options.js';
import { InputError } from '../../errors.js';
import { getRun, listMembers, listRuns, runKindPhrase, type RunRecord } from '../../store/runs.js';
import type { ServerContext } from '../context.js';
import { queryList, queryOptions } from '../query.js';
import { parseRunFilter } from '../../options/run-filter-options.js';
import { runListRow, runPendingJson, runShowJson } from '../../report/run-json.js';
import type { JobState } from '../run-queue.js';

/** The run's state as the server knows it: the store's status, or `queued` while it waits here. */
export function liveState(ctx: ServerContext, run: RunRecord): { status: string; queue: JobState | null; progress: unknown } {
  const queued = ctx.queue.state(run.id);
  // While this server holds the run, its state wins: the store may already say done a moment
  // before the run's thread has handed over.
  const status = queued ? queued.state : run.status;
  // A target-error run's progress is its half-width against the target; `total` is only its cap.
  const targetError = targetErrorOf(run);
  const progress =
    queued?.state === 'running' && queued.progress
      ? { done: queued.progress.done, total: queued.progress.total, seconds: queued.progress.seconds, mean: queued.progress.mean, half_width: queued.progress.halfWidth, target_error: targetError }
      : run.status === 'running' || queued
        ? { done: run.episodesDone, total: run.episodesRequested, seconds: run.seconds, mean: null, half_width: null, target_error: targetError }
        : null;
  return { status, queue: queued, progress };
}

/** The half-width a run stops at, or null for a run of fixed size. */
export function targetErrorOf(run: RunRecord): number | null {
  const target = (run.options as { targetError?: unknown }).targetError;
  return typeof target === 'number' ? target : null;
}

/** True when a run can no longer change, so what is computed from it may be kept. */
export function isSettled(ctx: ServerContext, run: RunRecord): boolean {
  return run.status !== 'running' && ctx.queue.state(run.id) === null;
}

export function findStoredRun(ctx: ServerContext, id: string): RunRecord {
  return getRun(ctx.db, id, 'this server\'s store');
}

/** `GET /api/runs` (the filters of `runs list`) and `GET /api/runs/:id` (what `runs show --json` prints). */
export function runRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.get('/api/runs', async (request) => {
    const q = queryOptions(request.query, ['env_hash', 'policy', 'limit', 'parent', 'label', 'since', 'until', 'status', 'kind', 'text'], ['label']);
    const limit = q.limit === undefined ? 100 : parseOption('limit', 'limit', q.limit);
    // Empty fields of the page's filter form mean "any".
    const given = (text: string | undefined) => (text === undefined || text.trim() === '' ? undefined : text);
    const choice = parseRunFilter(
      { label: queryList(request.query, 'label').filter((l) => given(l) !== undefined), since: given(q.since), until: given(q.until), status: given(q.status), kind: given(q.kind), text: given(q.text), policy: given(q.policy), envHash: given(q.env_hash) },
      (name) => `?${name.replace(/-/g, '_')}`,
    );
    const runs = listRuns(ctx.db, {
      envHash: choice.envHash ?? undefined,
      policy: choice.policy ?? undefined,
      labels: choice.labels,
      since: choice.since,
      until: choice.until,
      statuses: choice.statuses,
      kinds: choice.kinds,
      text: choice.text,
      limit,
      parentId: q.parent ?? null,
    });
    return runs.map((r) => {
      const live = liveState(ctx, r);
      return { ...runListRow(r, r.kind === 'comparison' ? listMembers(ctx.db, r.id) : null), status: live.status, progress: live.progress };
    });
  });

  app.get<{ Params: { id: string } }>('/api/runs/:id', async (request) => {
    const q = queryOptions(request.query, ['ci', 'confidence', 'ignore_stop', 'risk', 'quantiles', 'tail', 'event'], ['event']);
    const method = q.ci === undefined ? undefined : parseOption('ci', 'interval', q.ci);
    if (q.ignore_stop !== undefined && q.ignore_stop !== 'true' && q.ignore_stop !== 'false') {
      throw new InputError('ignore_stop', `must be true or false (got "${q.ignore_stop}")`);
    }
    const ignoreStop = q.ignore_stop === 'true';
    if (q.risk !== undefined && q.risk !== 'true' && q.risk !== 'false') throw new InputError('risk', `must be true or false (got "${q.risk}")`);
    const events = queryList(request.query, 'event');
    const risk = riskRequestFrom({ risk: q.risk === 'true', quantiles: q.quantiles, tail: q.tail, event: events.length ? events : undefined });
    const level = q.confidence === undefined ? undefined : parseOption('confidence', 'confidence', q.confidence);
    const run = findStoredRun(ctx, request.params.id);
    const live = liveState(ctx, run);
    if (run.kind !== 'estimate') {
      throw new InputError(`run ${run.id}`, `is ${runKindPhrase(run.kind)}; see it at /api/${run.kind === 'offpolicy' ? 'offpolicy' : 'comparisons'}/${run.id}`);
    }
    // A run still growing is summarised by its progress (running mean and half-width from the
    // engine): recomputing every figure from millions of stored returns on each request would
    // hold up every other request. The full figures come once it has ended.
    if (run.episodesDone < 2 || !isSettled(ctx, run)) return { ...runPendingJson(run), status: live.status, progress: live.progress };
    const result = ctx.analysis.figures(run, { method, level, ignoreStop, risk }, true);
    return { ...runShowJson(run, result), status: live.status, progress: live.progress };
  });

  /**
   * `POST /api/runs/:id/stop` (a run or a comparison): a run this server is running or holds
   * in its queue is stopped and left `interrupted`, its finished episodes kept. The request
   * must say it is JSON, which a form on another site cannot do without the browser asking.
   */
  app.post<{ Params: { id: string } }>('/api/runs/:id/stop', async (request, reply) => {
    queryOptions(request.query, []);
    if (!String(request.headers['content-type'] ?? '').startsWith('application/json')) {
      return reply.code(415).send({ error: 'send Content-Type: application/json (the body may be {})' });
    }
    const run = findStoredRun(ctx, request.params.id);
    if (!ctx.queue.stop(run.id)) {
      const where = run.status === 'running' ? `; it runs in process ${run.ownerPid}${run.ownerHost ? ` on ${run.ownerHost}` : ''}, stop it there` : '';
      return reply.code(409).send({ error: `run ${run.id}: is ${run.status}, not running on this server${where}` });
    }
    return reply.code(202).send({ id: run.id, status: 'stopping' });
  });

  /** The run's definitions as it ran them (and, for the command line's runs, as their files said). */
  app.get<{ Params: { id: string } }>('/api/runs/:id/definitions', async (request) => {
    queryOptions(request.query, []);
    const run = findStoredRun(ctx, request.params.id);
    return { env_name: run.env.label, env: run.env.json, policy_name: run.policy.label, policy: run.policy.json, seed: run.seed, start: run.start };
  });
}
