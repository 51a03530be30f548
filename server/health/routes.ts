/**
 * /api/health: is the server up, which version, and whether the development outbox is mounted
 * (devOutbox; the client shows its tab only then). Checks the database with a trivial query.
 */
import { Router } from 'express';
import type { RouteDeps } from '../deps';

export function healthRouter(deps: RouteDeps): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    await deps.dataSource.query('SELECT 1');
    res.json({ ok: true, version: deps.config.version, devOutbox: deps.config.devOutbox && !deps.config.isProduction });
  });
  return router;
}
