/**
 * The review board's routes (contract in shared/review.ts): the board of a batch, verdicts with their
 * history, comments, review requests, the inbox and the model comparison.
 * Mounted at /api (paths carry their own /studies/:studyId or /me prefix). Building the router also
 * registers the app's notification dispatcher and sends anything left pending.
 */
import { Router, type Request } from 'express';
import { can } from '../../shared/api';
import {
  commentBodySchema,
  parseIdList,
  reviewRequestBodySchema,
  verdictBodySchema,
  type ParsedVerdictBody,
} from '../../shared/review';
import { currentStudy, currentUser } from '../auth/context';
import { badRequest, forbidden, idParam, notFound, validate } from '../errors';
import { syncDb } from '../db/sync';
import { createNotifier, registerNotifier, type Notifier } from '../notify/notifier';
import type { RouteDeps } from '../deps';
import { compareItems } from './compare';
import { GofCache } from './gofData';
import { LayoutCache } from './layout';
import { boardOf } from './board';
import { addComment, commentsOf } from './comments';
import { completeRequest, createRequests, inboxOf, requestById, requestsOf } from './requests';
import { checkCard, historyOf, loadReviewBatch, requireDone, saveVerdict } from './service';

function cardQuery(req: Request): { statistic: string; period: number } {
  const statistic = typeof req.query.statistic === 'string' ? req.query.statistic : '';
  const period = Number(req.query.period);
  if (!statistic) throw badRequest('Say which statistic: ?statistic=triad_census&period=1.');
  if (!Number.isInteger(period) || period < 1) throw badRequest('Say which period (a whole number from 1): ?statistic=triad_census&period=1.');
  return { statistic, period };
}

export interface ReviewRouter extends Router {
  notifier: Notifier;
}

export function reviewRouter(deps: RouteDeps): ReviewRouter {
  const { dataSource, auth } = deps;
  const router = Router() as ReviewRouter;
  const gof = new GofCache();
  const layouts = new LayoutCache();
  const notifier = createNotifier(deps);
  router.notifier = notifier;
  try {
    registerNotifier(dataSource, notifier);
    void notifier.flush();
  } catch {
    // A data source that is not open yet: the first recorded event wakes the dispatcher instead.
  }

  const batchOf = (req: Request) => loadReviewBatch(dataSource, currentStudy(req).study.id, idParam(req, 'batchId', 'Batch'));
  const member = (ability: Parameters<typeof auth.requireStudyRole>[0]) => [auth.requireUser, auth.requireStudyRole(ability)];
  const B = '/studies/:studyId/batches/:batchId';

  router.get(`${B}/board`, ...member('read'), (req, res) => {
    res.json(boardOf(dataSource, batchOf(req)));
  });

  router.get(`${B}/board/chart`, ...member('read'), async (req, res) => {
    const batch = batchOf(req);
    const card = cardQuery(req);
    checkCard(batch, card.statistic, card.period);
    requireDone(batch);
    await gof.prepare(dataSource, batch);
    res.json(gof.one(dataSource, batch, card.statistic, card.period));
  });

  router.get(`${B}/consensus/layout`, ...member('read'), async (req, res) => {
    const batch = batchOf(req);
    requireDone(batch);
    const raw = req.query.period;
    const period = raw === undefined || raw === '' ? batch.summary.periods[0] : Number(raw);
    if (!Number.isInteger(period) || period < 1) throw badRequest('The period is a whole number from 1.');
    res.json(await layouts.get(dataSource, batch, period));
  });

  router.post(`${B}/verdicts`, ...member('review'), validate(verdictBodySchema), async (req, res) => {
    const user = currentUser(req);
    const { verdict, created } = await saveVerdict(dataSource, batchOf(req), user, req.body as ParsedVerdictBody);
    res.status(created ? 201 : 200).json({ verdict });
  });

  router.get(`${B}/verdicts/history`, ...member('read'), (req, res) => {
    const batch = batchOf(req);
    const card = cardQuery(req);
    checkCard(batch, card.statistic, card.period);
    res.json({ history: historyOf(syncDb(dataSource), batch.row.id, card.statistic, card.period) });
  });

  router.get(`${B}/comments`, ...member('read'), (req, res) => {
    const batch = batchOf(req);
    if (req.query.statistic === undefined && req.query.period === undefined) {
      res.json({ comments: commentsOf(syncDb(dataSource), batch.row.id) });
      return;
    }
    const card = cardQuery(req);
    checkCard(batch, card.statistic, card.period);
    res.json({ comments: commentsOf(syncDb(dataSource), batch.row.id, card) });
  });

  router.post(`${B}/comments`, ...member('review'), validate(commentBodySchema), async (req, res) => {
    const comment = await addComment(dataSource, batchOf(req), currentUser(req), req.body as { statistic: string; period: number; body: string });
    res.status(201).json({ comment });
  });

  router.get(`${B}/review-requests`, ...member('read'), (req, res) => {
    res.json({ requests: requestsOf(syncDb(dataSource), batchOf(req).row.id) });
  });

  router.post(`${B}/review-requests`, ...member('manageTeam'), validate(reviewRequestBodySchema), async (req, res) => {
    const result = await createRequests(dataSource, batchOf(req), currentUser(req), req.body as { userIds: number[]; message: string });
    await notifier.flush();
    res.status(201).json(result);
  });

  router.post('/studies/:studyId/review-requests/:requestId/complete', ...member('read'), async (req, res) => {
    const { study, role } = currentStudy(req);
    const user = currentUser(req);
    const request = requestById(syncDb(dataSource), study.id, idParam(req, 'requestId', 'Review request'));
    if (!request) throw notFound('Review request not found.');
    if (request.reviewer.id !== user.id && !can(role, 'manageTeam') && !user.isAdmin) {
      throw forbidden(`Only ${request.reviewer.name} (who was asked) or a lead can mark this review done.`);
    }
    res.json({ request: await completeRequest(dataSource, request) });
  });

  router.get('/me/inbox', auth.requireUser, (req, res) => {
    res.json({ items: inboxOf(dataSource, currentUser(req).id) });
  });

  router.get('/studies/:studyId/compare', ...member('read'), (req, res) => {
    let batchIds: number[];
    let fitIds: number[];
    try {
      batchIds = parseIdList(req.query.batches, 'Batches');
      fitIds = parseIdList(req.query.fits, 'Fits');
    } catch (e) {
      throw badRequest((e as Error).message);
    }
    res.json(compareItems(dataSource, gof, currentStudy(req).study.id, batchIds, fitIds));
  });

  return router;
}
