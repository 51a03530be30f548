/** /api/health: is the server up, and which version. Checks the database with a trivial query. */
import { Router } from 'express';
import type { RouteDeps } from '../deps';

export function healthRouter(deps: RouteDeps): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    await deps.dataSource.query('SELECT 1');
    res.json({ ok: true, version: deps.config.version });
  });
  return router;
}
