/**
 * The lineup test's routes (contract in shared/lineups.ts). Mounted at /api; every path carries its
 * /studies/:studyId prefix. Members with the review ability make and take lineups; a lead invites.
 */
import { Router } from 'express';
import { createLineupBodySchema, lineupInviteBodySchema, pickBodySchema } from '../../shared/lineups';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import { currentStudy, currentUser } from '../auth/context';
import { idParam, validate } from '../errors';
import type { RouteDeps } from '../deps';
import { loadReviewBatch } from '../review/service';
import { createLineup, inviteToLineup, lineupDetail, lineupsOf, loadLineup, pickPanel } from './service';

export function lineupsRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();
  const member = (ability: Parameters<typeof auth.requireStudyRole>[0]) => [auth.requireUser, auth.requireStudyRole(ability)];
  const B = '/studies/:studyId/batches/:batchId/lineups';
  const L = '/studies/:studyId/lineups/:lineupId';

  router.get(B, ...member('read'), (req, res) => {
    const batch = loadReviewBatch(dataSource, currentStudy(req).study.id, idParam(req, 'batchId', 'Batch'));
    res.json({ lineups: lineupsOf(dataSource, batch, currentUser(req).id) });
  });

  router.post(B, ...member('review'), validate(createLineupBodySchema), async (req, res) => {
    const batch = loadReviewBatch(dataSource, currentStudy(req).study.id, idParam(req, 'batchId', 'Batch'));
    const lineup = await createLineup(dataSource, batch, currentUser(req), req.body as { statistic: AuxStatisticId; period: number; panels: number; seed?: number });
    res.status(201).json({ lineup });
  });

  router.get(L, ...member('read'), (req, res) => {
    const lineup = loadLineup(dataSource, currentStudy(req).study.id, idParam(req, 'lineupId', 'Lineup'));
    res.json(lineupDetail(dataSource, lineup, currentUser(req).id));
  });

  router.post(`${L}/picks`, ...member('review'), validate(pickBodySchema), async (req, res) => {
    const lineup = loadLineup(dataSource, currentStudy(req).study.id, idParam(req, 'lineupId', 'Lineup'));
    res.status(201).json(await pickPanel(dataSource, lineup, currentUser(req), req.body as { panel: number; reason: string }));
  });

  router.post(`${L}/invitations`, ...member('manageTeam'), validate(lineupInviteBodySchema), async (req, res) => {
    const lineup = loadLineup(dataSource, currentStudy(req).study.id, idParam(req, 'lineupId', 'Lineup'));
    res.status(201).json(await inviteToLineup(dataSource, lineup, currentUser(req), req.body as { userIds: number[]; message: string }));
  });

  return router;
}
