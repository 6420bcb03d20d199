import { randomInt } from 'node:crypto';
import type { FastifyInstance } from 'fastify';
import { InputError } from '../../errors.js';
import type { ServerContext } from '../context.js';
import { fieldOf, parseBody, planEvaluation } from '../evaluation-request.js';
import { submitRun } from './submit.js';

/**
 * `POST /api/evaluations`: checks the body, creates the run (in its own thread) and answers
 * 202 with its id; the run waits in the bounded queue and runs off the request thread.
 * 429 when the queue is full. The run is an ordinary stored run: `reckon runs show ID` sees it.
 */
export function evaluationRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.post('/api/evaluations', async (request, reply) => {
    const body = parseBody(request.body);
    const labels = { env: body.env_name ?? 'env', policy: body.policy_name ?? 'policy' };
    try {
      const plan = planEvaluation(body, randomInt(0, 2 ** 31), ctx.limits);
      return await submitRun(ctx, reply, { kind: 'estimate', spec: plan.spec, options: plan.options, annotations: plan.annotations }, { seed: plan.spec.seed, episodes: plan.options.episodes });
    } catch (e) {
      if (e instanceof InputError) return reply.code(e.httpStatus).send({ error: e.message, field: fieldOf(e, labels) });
      throw e;
    }
  });
}
