/**
 * The review board's routes (contract in shared/review.ts): the board of a batch, verdicts with their
 * history, comments, review requests, the inbox, notification preferences and the model comparison.
 * Mounted at /api (paths carry their own /studies/:studyId or /me prefix). Building the router also
 * registers the app's notification dispatcher and sends anything left pending.
 */
import { Router, type Request, type RequestHandler, type Response } from 'express';
import { can, type ApiErrorCode } from '../../shared/api';
import {
  commentBodySchema,
  notificationPreferencesBodySchema,
  parseIdList,
  reviewRequestBodySchema,
  verdictBodySchema,
  type NotificationPreferences,
  type ParsedVerdictBody,
} from '../../shared/review';
import { currentStudy, currentUser } from '../auth/context';
import { ApiError, badRequest, forbidden, idParam, notFound, validate } from '../errors';
import { inSyncTransaction, syncDb } from '../jobs/db';
import { createNotifier, registerNotifier, type Notifier } from '../notify/notifier';
import { preferencesOf, updatePreferences } from '../notify/preferences';
import type { RouteDeps } from '../deps';
import { compareItems } from './compare';
import { GofCache } from './gofData';
import { LayoutCache } from './layout';
import {
  addComment,
  boardOf,
  checkCard,
  commentsOf,
  completeRequest,
  createRequests,
  historyOf,
  inboxOf,
  loadReviewBatch,
  requestById,
  requestsOf,
  requireDone,
  ReviewError,
  saveVerdict,
} from './service';

export function toApiError(error: unknown): unknown {
  if (error instanceof ReviewError) return new ApiError(error.status, error.code, error.message, error.details);
  return error;
}

/** Wraps a handler so ReviewError becomes the API's error shape. */
export function guarded(handler: (req: Request, res: Response) => Promise<void> | void): RequestHandler {
  return async (req, res) => {
    try {
      await handler(req, res);
    } catch (error) {
      throw toApiError(error);
    }
  };
}

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

  router.get(`${B}/board`, ...member('read'), guarded((req, res) => {
    res.json(boardOf(dataSource, batchOf(req)));
  }));

  router.get(`${B}/board/chart`, ...member('read'), guarded((req, res) => {
    const batch = batchOf(req);
    const card = cardQuery(req);
    checkCard(batch, card.statistic, card.period);
    requireDone(batch);
    res.json(gof.one(dataSource, batch, card.statistic, card.period));
  }));

  router.get(`${B}/consensus/layout`, ...member('read'), guarded(async (req, res) => {
    const batch = batchOf(req);
    requireDone(batch);
    const raw = req.query.period;
    const period = raw === undefined || raw === '' ? batch.summary.periods[0] : Number(raw);
    if (!Number.isInteger(period) || period < 1) throw badRequest('The period is a whole number from 1.');
    res.json(await layouts.get(dataSource, batch, period));
  }));

  router.post(`${B}/verdicts`, ...member('review'), validate(verdictBodySchema), guarded(async (req, res) => {
    const user = currentUser(req);
    const { verdict, created } = await saveVerdict(dataSource, batchOf(req), user, req.body as ParsedVerdictBody);
    res.status(created ? 201 : 200).json({ verdict });
  }));

  router.get(`${B}/verdicts/history`, ...member('read'), guarded((req, res) => {
    const batch = batchOf(req);
    const card = cardQuery(req);
    checkCard(batch, card.statistic, card.period);
    res.json({ history: historyOf(syncDb(dataSource), batch.row.id, card.statistic, card.period) });
  }));

  router.get(`${B}/comments`, ...member('read'), guarded((req, res) => {
    const batch = batchOf(req);
    if (req.query.statistic === undefined && req.query.period === undefined) {
      res.json({ comments: commentsOf(syncDb(dataSource), batch.row.id) });
      return;
    }
    const card = cardQuery(req);
    checkCard(batch, card.statistic, card.period);
    res.json({ comments: commentsOf(syncDb(dataSource), batch.row.id, card) });
  }));

  router.post(`${B}/comments`, ...member('review'), validate(commentBodySchema), guarded(async (req, res) => {
    const comment = await addComment(dataSource, batchOf(req), currentUser(req), req.body as { statistic: string; period: number; body: string });
    res.status(201).json({ comment });
  }));

  router.get(`${B}/review-requests`, ...member('read'), guarded((req, res) => {
    res.json({ requests: requestsOf(syncDb(dataSource), batchOf(req).row.id) });
  }));

  router.post(`${B}/review-requests`, ...member('manageTeam'), validate(reviewRequestBodySchema), guarded(async (req, res) => {
    const result = await createRequests(dataSource, batchOf(req), currentUser(req), req.body as { userIds: number[]; message: string });
    await notifier.flush();
    res.status(201).json(result);
  }));

  router.post('/studies/:studyId/review-requests/:requestId/complete', ...member('read'), guarded(async (req, res) => {
    const { study, role } = currentStudy(req);
    const user = currentUser(req);
    const request = requestById(syncDb(dataSource), study.id, idParam(req, 'requestId', 'Review request'));
    if (!request) throw notFound('Review request not found.');
    if (request.reviewer.id !== user.id && !can(role, 'manageTeam') && !user.isAdmin) {
      throw forbidden(`Only ${request.reviewer.name} (who was asked) or a lead can mark this review done.`);
    }
    res.json({ request: await completeRequest(dataSource, request) });
  }));

  router.get('/me/inbox', auth.requireUser, (req, res) => {
    res.json({ items: inboxOf(dataSource, currentUser(req).id) });
  });

  router.get('/me/notifications', auth.requireUser, (req, res) => {
    res.json({ preferences: preferencesOf(syncDb(dataSource), currentUser(req).id) });
  });

  router.patch('/me/notifications', auth.requireUser, validate(notificationPreferencesBodySchema), async (req, res) => {
    const user = currentUser(req);
    const change = req.body as Partial<NotificationPreferences>;
    const preferences = await inSyncTransaction(syncDb(dataSource), (db) => updatePreferences(db, user.id, change));
    res.json({ preferences });
  });

  router.get('/studies/:studyId/compare', ...member('read'), guarded((req, res) => {
    let batchIds: number[];
    let fitIds: number[];
    try {
      batchIds = parseIdList(req.query.batches, 'Batches');
      fitIds = parseIdList(req.query.fits, 'Fits');
    } catch (e) {
      throw badRequest((e as Error).message);
    }
    res.json(compareItems(dataSource, gof, currentStudy(req).study.id, batchIds, fitIds));
  }));

  return router;
}
