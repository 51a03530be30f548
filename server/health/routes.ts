/**
 * /api/health: is the server up, which version, and whether it mounts the development outbox
 * (`devOutbox`; the same condition as server/app.ts uses to mount /api/dev). Checks the database with
 * a trivial query.
 */
import { Router } from 'express';
import type { RouteDeps } from '../deps';

export function healthRouter(deps: RouteDeps): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    await deps.dataSource.query('SELECT 1');
    res.json({ ok: true, version: deps.config.version, devOutbox: !deps.config.isProduction });
  });
  return router;
}
