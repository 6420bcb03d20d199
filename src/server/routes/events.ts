import type { FastifyInstance } from 'fastify';
import type { ServerContext } from '../context.js';
import type { JobEvent } from '../run-queue.js';
import { findStoredRun, liveState, targetErrorOf } from './runs.js';

/**
 * `GET /api/runs/:id/events`: server-sent events (the HTML standard's `text/event-stream`)
 * with the run's progress. A `state` event first, then `progress` events while it runs, and
 * one `end` event (its final status), after which the stream closes; a run that is not
 * running here gets `state` and `end` at once. Polling `GET /api/runs/:id` works as well.
 */
export function eventRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.get<{ Params: { id: string } }>('/api/runs/:id/events', async (request, reply) => {
    const run = findStoredRun(ctx, request.params.id);
    reply.hijack();
    const out = reply.raw;
    out.writeHead(200, {
      'content-type': 'text/event-stream; charset=utf-8',
      'cache-control': 'no-store',
      connection: 'keep-alive',
    });
    const send = (event: string, data: unknown) => out.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
    const live = liveState(ctx, run);
    send('state', { id: run.id, status: live.status, progress: live.progress });
    if (live.queue === null) {
      send('end', { id: run.id, status: run.status, error: run.error });
      out.end();
      return;
    }
    const stop = ctx.queue.follow(run.id, (event: JobEvent) => {
      if (event.type === 'started') send('state', { id: run.id, status: 'running', progress: null });
      else if (event.type === 'progress') {
        const p = event.progress;
        send('progress', { id: run.id, done: p.done, total: p.total, seconds: p.seconds, mean: p.mean, half_width: p.halfWidth, target_error: targetErrorOf(run) });
      } else {
        send('end', { id: run.id, status: event.status, error: event.error });
        stop();
        out.end();
      }
    });
    request.raw.on('close', stop);
  });
}
