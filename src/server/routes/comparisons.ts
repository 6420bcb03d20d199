import { randomInt } from 'node:crypto';
import type { FastifyInstance } from 'fastify';
import { InputError } from '../../errors.js';
import { analyzeStoredComparison } from '../../evaluate/stored-compare.js';
import { listMembers } from '../../store/runs.js';
import { comparisonShowJson, runProvenanceJson } from '../../report/run-json.js';
import { analyzeRunsComparisonRun, isRunsCompareRecord } from '../../evaluate/runs-compare-store.js';
import { runsCompareJson } from '../../report/runs-compare-report.js';
import { differencesSpec } from '../../report/plots/differences.js';
import { groupMembersSpec, type GroupPlotRow } from '../../report/plots/group-members.js';
import type { ServerContext } from '../context.js';
import { comparisonLabels, parseComparisonBody, planComparison } from '../comparison-request.js';
import { queryOptions } from '../query.js';
import { findStoredRun, isSettled, liveState } from './runs.js';
import { submitRun } from './submit.js';
import { annotationsFromBody } from '../../options/annotation-options.js';

/**
 * `POST /api/comparisons` (as `reckon compare`: policies on common random numbers, stored as
 * a comparison run with one member run per policy), `GET /api/comparisons/:id` (what
 * `runs show ID --json` prints for it, plus status and progress), its differences plot, and
 * for a comparison of groups the plot of members and group means.
 */
export function comparisonRoutes(app: FastifyInstance, ctx: ServerContext): void {
  app.post('/api/comparisons', async (request, reply) => {
    const body = parseComparisonBody(request.body);
    const labels = comparisonLabels(body);
    try {
      const plan = planComparison(body, randomInt(0, 2 ** 31), ctx.limits);
      return await submitRun(ctx, reply, { kind: 'comparison', request: plan, annotations: annotationsFromBody(body) }, { seed: plan.seed, episodes: plan.episodes });
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      const policy = labels.policies.indexOf(e.where);
      const field = e.where === labels.env ? 'env' : policy >= 0 ? labels.fields[policy] : e.where.startsWith('groups[') ? e.where : e.where.startsWith('--') ? e.where.slice(2).replace(/-/g, '_') : null;
      return reply.code(e.httpStatus).send({ error: e.message, field });
    }
  });

  const comparisonRun = (id: string) => {
    const run = findStoredRun(ctx, id);
    if (run.kind !== 'comparison') throw new InputError(`run ${run.id}`, `is an ${run.kind} run; see it at /api/runs/${run.id}`);
    return run;
  };

  app.get<{ Params: { id: string } }>('/api/comparisons/:id', async (request) => {
    queryOptions(request.query, []);
    const run = comparisonRun(request.params.id);
    const live = liveState(ctx, run);
    if (!isSettled(ctx, run)) {
      return { run_id: run.id, kind: 'comparison', env: run.env.label, seed: run.seed, status: live.status, progress: live.progress, created_at: run.createdAt };
    }
    if (isRunsCompareRecord(run)) {
      const comparison = ctx.analysis.remember(`runs-compare|${run.id}`, () => analyzeRunsComparisonRun(ctx.db, run));
      return { ...runsCompareJson(comparison, run.toolVersion, run.id), kind: 'comparison', ...runProvenanceJson(run), status: live.status, progress: null };
    }
    const members = ctx.analysis.remember(`members|${run.id}`, () => listMembers(ctx.db, run.id));
    let analysed: ReturnType<typeof analyzeStoredComparison>;
    try {
      analysed = ctx.analysis.remember(`comparison|${run.id}`, () => analyzeStoredComparison(ctx.db, run));
    } catch (e) {
      // Stopped before its members held two paired episodes: still a run with a status and a way on.
      if (!(e instanceof InputError) || live.status === 'done') throw e;
      return { run_id: run.id, kind: 'comparison', env: run.env.label, seed: run.seed, status: live.status, progress: null, created_at: run.createdAt, members: members.map((m) => m.id), figures_unavailable: e.message };
    }
    return { ...comparisonShowJson(run, analysed.result, analysed.labels, members), status: live.status, progress: null };
  });

  app.get<{ Params: { id: string } }>('/api/comparisons/:id/plot', async (request) => {
    queryOptions(request.query, []);
    const run = comparisonRun(request.params.id);
    if (!isSettled(ctx, run)) throw new InputError(`run ${run.id}`, 'is still running; its plot comes when it ends');
    if (isRunsCompareRecord(run)) {
      const comparison = ctx.analysis.remember(`runs-compare|${run.id}`, () => analyzeRunsComparisonRun(ctx.db, run));
      const json = runsCompareJson(comparison, run.toolVersion, run.id);
      const names = json.policies.map((p) => p.name);
      return differencesSpec(
        json.differences.map((d) => ({ pair: `${names[d.a]} − ${names[d.b]}`, mean: d.mean, low: d.low, high: d.high })),
        {
          title: `Differences of stored runs on ${comparison.labels.env} (run ${run.id})`,
          subtitle: `bars: ${Math.round(json.level * 100)}% ${comparison.paired ? `${json.differences[0]?.method ?? ''} interval, paired by episode` : "Welch interval, unpaired"}; dashed: no difference`,
        },
      );
    }
    const { result, labels } = ctx.analysis.remember(`comparison|${run.id}`, () => analyzeStoredComparison(ctx.db, run));
    // Between training methods the question is the difference of group means (Welch on member
    // means): the pairs of individual members would bury it under K_A·K_B bars.
    if (result.groups && result.groups.pairs.length > 0) {
      const groups = result.groups.groups;
      return differencesSpec(
        result.groups.pairs.map((pair) => ({ pair: `${groups[pair.first].name} − ${groups[pair.second].name}`, mean: pair.mean, low: pair.interval.low, high: pair.interval.high })),
        {
          title: `Differences of group means on ${labels.env} (run ${run.id}, ${result.episodes.toLocaleString('en-US')} episodes a member)`,
          subtitle: `bars: ${Math.round(result.request.level * 100)}% Welch interval on the members' means (seeds and episodes); dashed: no difference`,
        },
      );
    }
    const rows = result.comparison.pairs.map((pair, q) => ({
      pair: `${labels.policies[pair.first]} − ${labels.policies[pair.second]}`,
      mean: pair.meanDifference,
      low: result.differenceIntervals[q].low,
      high: result.differenceIntervals[q].high,
    }));
    const interval = result.differenceIntervals[0];
    return differencesSpec(rows, {
      title: `Paired differences on ${labels.env} (run ${run.id}, ${result.episodes.toLocaleString('en-US')} episodes each)`,
      subtitle: `bars: ${Math.round(result.request.level * 100)}% ${interval?.method ?? ''} interval of each difference; dashed: no difference`,
    });
  });

  app.get<{ Params: { id: string } }>('/api/comparisons/:id/groups-plot', async (request) => {
    queryOptions(request.query, []);
    const run = comparisonRun(request.params.id);
    if (!isSettled(ctx, run)) throw new InputError(`run ${run.id}`, 'is still running; its plot comes when it ends');
    const { result, labels } = ctx.analysis.remember(`comparison|${run.id}`, () => analyzeStoredComparison(ctx.db, run));
    if (!result.groups) throw new InputError(`run ${run.id}`, 'compares no groups of policies; see its differences at /api/comparisons/' + run.id + '/plot');
    const rows: GroupPlotRow[] = [];
    for (const g of result.groups.groups) {
      g.members.forEach((p, i) => {
        const e = result.estimates[p];
        rows.push({ row: `${g.name}: ${labels.policies[p]}`, group: g.name, kind: 'member', mean: g.components.memberMeans[i], low: e.ci.low, high: e.ci.high });
      });
      rows.push({ row: `${g.name}: group mean`, group: g.name, kind: 'group', mean: g.mean, low: g.interval.low, high: g.interval.high });
    }
    const level = Math.round(result.request.level * 100);
    return groupMembersSpec(rows, {
      title: `Groups on ${labels.env} (run ${run.id}, ${result.episodes.toLocaleString('en-US')} episodes a member)`,
      subtitle: `blue: each member with its ${level}% interval from episode noise only; red: the group mean with its ${level}% interval over seeds`,
    });
  });
}
