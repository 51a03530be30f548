/** /api/me/notifications: the signed-in person's notification preferences (read, change). */
import { Router } from 'express';
import { notificationPreferencesBodySchema, type NotificationPreferences } from '../../shared/review';
import { currentUser } from '../auth/context';
import { inSyncTransaction, syncDb } from '../db/sync';
import type { RouteDeps } from '../deps';
import { validate } from '../errors';
import { preferencesOf, updatePreferences } from './preferences';

export function notifyRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();

  router.get('/me/notifications', auth.requireUser, (req, res) => {
    res.json({ preferences: preferencesOf(syncDb(dataSource), currentUser(req).id) });
  });

  router.patch('/me/notifications', auth.requireUser, validate(notificationPreferencesBodySchema), async (req, res) => {
    const user = currentUser(req);
    const change = req.body as Partial<NotificationPreferences>;
    const preferences = await inSyncTransaction(syncDb(dataSource), (db) => updatePreferences(db, user.id, change));
    res.json({ preferences });
  });

  return router;
}
