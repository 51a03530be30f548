/**
 * /api/dev: development helpers. Mounted only when config.devOutbox is set (WAVEFIT_DEV_OUTBOX=1,
 * never in production), and only for signed-in site admins: the outbox holds invitation links.
 */
import { Router } from 'express';
import { currentUser } from '../auth/context';
import { forbidden } from '../errors';
import { isOutbox } from '../mail/mailer';
import type { RouteDeps } from '../deps';

export function devRouter(deps: RouteDeps): Router {
  const router = Router();
  router.get('/outbox', deps.auth.requireUser, (req, res) => {
    if (!currentUser(req).isAdmin) throw forbidden('Only a site administrator may read the outbox.');
    res.json({ messages: isOutbox(deps.mailer) ? deps.mailer.messages() : [] });
  });
  return router;
}
