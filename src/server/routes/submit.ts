import type { FastifyReply } from 'fastify';
import type { ServerContext } from '../context.js';
import type { EvaluationTask } from '../evaluation-messages.js';
import { prepareEvaluation } from '../evaluation-job.js';

/**
 * Admits a run to the queue: 429 when full; otherwise its thread creates the stored run (a bad
 * definition rejects with the InputError the command line prints) and the answer is 202 with
 * the run's id, while the run waits its turn.
 */
export async function submitRun(ctx: ServerContext, reply: FastifyReply, task: EvaluationTask, extra: Record<string, unknown>) {
  const place = ctx.queue.reserve();
  if (place === null) {
    const { running, waiting } = ctx.queue.size;
    return reply.code(429).header('retry-after', '5').send({ error: `the server is busy (${running} running, ${waiting} waiting, the most it holds); try again shortly` });
  }
  let job;
  try {
    job = await prepareEvaluation(ctx.db, ctx.threads, task);
  } catch (e) {
    place.release();
    throw e;
  }
  place.add(job);
  const path = task.kind === 'estimate' ? 'runs' : 'comparisons';
  return reply
    .code(202)
    .header('location', `/api/${path}/${job.id}`)
    .send({ id: job.id, status: ctx.queue.state(job.id)?.state ?? 'running', ...extra });
}
