/**
 * /api/studies/:studyId/explore/...: choice explanations and the first-ministep overview of a fit,
 * chain replays and tie timelines of a finished batch. Members read; non-members get 404 (the study
 * guard). Query strings are checked with the zod schemas of shared/explore.ts.
 */
import { Router, type Request } from 'express';
import type { ZodType } from 'zod';
import { choiceQuerySchema, overviewQuerySchema, replayQuerySchema, timelinesQuerySchema } from '../../shared/explore';
import { currentStudy } from '../auth/context';
import { getBatch, type LoadedBatch } from '../batches/service';
import { badRequest, conflict, fieldErrors, idParam, notFound } from '../errors';
import type { RouteDeps } from '../deps';
import '../batches/jobKind';
import { actorsOf, choiceOf, ContextCache, overviewOf, replayChain, timelinesOf } from './service';

function query<T>(schema: ZodType<T>, req: Request): T {
  const result = schema.safeParse(req.query);
  if (!result.success) {
    const details = fieldErrors(result.error);
    const words = Object.entries(details.fields).map(([f, m]) => (f ? `${f}: ${m.join(' ')}` : m.join(' ')));
    throw badRequest(`The request was not accepted: ${words.join('; ')}`, details, 'validation_failed');
  }
  return result.data;
}

export function exploreRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();
  const contexts = new ContextCache();
  const member = [auth.requireUser, auth.requireStudyRole('read')];

  const loadBatch = (req: Request): LoadedBatch => {
    const { study } = currentStudy(req);
    const batch = getBatch(dataSource, study.id, idParam(req, 'batchId', 'Batch'));
    if (!batch) throw notFound('Batch not found.');
    return batch;
  };

  router.get('/:studyId/explore/fits/:fitId/choices', ...member, async (req, res) => {
    const { study } = currentStudy(req);
    const fitId = idParam(req, 'fitId', 'Fit');
    const q = query(choiceQuerySchema, req);
    res.json(await choiceOf(dataSource, study.id, fitId, q.period, q.actor));
  });

  router.get('/:studyId/explore/fits/:fitId/overview', ...member, async (req, res) => {
    const { study } = currentStudy(req);
    const fitId = idParam(req, 'fitId', 'Fit');
    const q = query(overviewQuerySchema, req);
    res.json(await overviewOf(dataSource, study.id, fitId, q.period, q.order));
  });

  router.get('/:studyId/explore/batches/:batchId/replay', ...member, async (req, res) => {
    const batch = loadBatch(req);
    const q = query(replayQuerySchema, req);
    if (batch.summary.state !== 'done') throw conflict('batch_not_ready', `This batch is ${batch.summary.state}; chains can be replayed once it is done.`);
    const context = await contexts.get(dataSource, batch.row.id);
    const actors = await actorsOf(dataSource, batch.row.studyId, context.n);
    res.json(replayChain(dataSource, batch, context, actors, q.period, q.chain));
  });

  router.get('/:studyId/explore/batches/:batchId/timelines', ...member, async (req, res) => {
    const batch = loadBatch(req);
    const q = query(timelinesQuerySchema, req);
    if (batch.summary.state !== 'done') throw conflict('batch_not_ready', `This batch is ${batch.summary.state}; its chains can be re-simulated once it is done.`);
    const context = await contexts.get(dataSource, batch.row.id);
    const actors = await actorsOf(dataSource, batch.row.studyId, context.n);
    res.json(timelinesOf(dataSource, batch, context, actors, q));
  });

  return router;
}
