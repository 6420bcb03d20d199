import type { FastifyInstance } from 'fastify';
import { z } from 'zod';
import { InputError } from '../../errors.js';
import { labelKeySchema, labelValueSchema, noteSchema } from '../../options/annotation-options.js';
import { addNote, removeLabels, setLabels } from '../../store/annotations.js';
import { annotationsJson } from '../../report/run-json.js';
import type { ServerContext } from '../context.js';
import { queryOptions } from '../query.js';
import { findStoredRun } from './runs.js';

const labelsBody = z.strictObject({ labels: z.record(labelKeySchema, labelValueSchema).optional(), remove: z.array(labelKeySchema).optional() });
const noteBody = z.strictObject({ text: noteSchema });

/** A body checked by its schema; a refusal names the field, as the command line names the option. */
function parseBody<T>(schema: z.ZodType<T>, body: unknown): T {
  const result = schema.safeParse(body);
  if (!result.success) {
    const issue = result.error.issues[0];
    // A bad key of a record carries the key's own issue inside it.
    const inner = (issue as { issues?: { message: string }[] } | undefined)?.issues?.[0];
    throw new InputError(issue?.path.length ? issue.path.join('.') : 'body', inner?.message ?? issue?.message ?? 'is not valid');
  }
  return result.data;
}

/**
 * `POST /api/runs/:id/labels` (`{"labels": {"k": "v"}, "remove": ["k"]}`) and
 * `POST /api/runs/:id/notes` (`{"text": "…"}`): what `runs label` and `runs note` do, for the
 * page. JSON bodies only, which a form on another site cannot send without the browser asking.
 */
export function annotationRoutes(app: FastifyInstance, ctx: ServerContext): void {
  const requireJson = (type: unknown) => {
    if (!String(type ?? '').startsWith('application/json')) throw new InputError('content-type', 'send Content-Type: application/json');
  };
  app.post<{ Params: { id: string } }>('/api/runs/:id/labels', async (request) => {
    queryOptions(request.query, []);
    requireJson(request.headers['content-type']);
    const run = findStoredRun(ctx, request.params.id);
    const body = parseBody(labelsBody, request.body);
    ctx.db.transaction(() => {
      removeLabels(ctx.db, run.id, body.remove ?? []);
      setLabels(ctx.db, run.id, body.labels ?? {});
    })();
    return { run_id: run.id, ...annotationsJson(findStoredRun(ctx, run.id)) };
  });
  app.post<{ Params: { id: string } }>('/api/runs/:id/notes', async (request, reply) => {
    queryOptions(request.query, []);
    requireJson(request.headers['content-type']);
    const run = findStoredRun(ctx, request.params.id);
    const body = parseBody(noteBody, request.body);
    addNote(ctx.db, run.id, body.text);
    return reply.code(201).send({ run_id: run.id, ...annotationsJson(findStoredRun(ctx, run.id)) });
  });
}
