/** /api/dev: development helpers, never mounted when NODE_ENV=production. */
import { Router } from 'express';
import { isOutbox } from '../mail/mailer';
import type { RouteDeps } from '../deps';

export function devRouter(deps: RouteDeps): Router {
  const router = Router();
  router.get('/outbox', (_req, res) => {
    res.json({ messages: isOutbox(deps.mailer) ? deps.mailer.messages() : [] });
  });
  return router;
}
