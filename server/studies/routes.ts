/** /api/studies: list (members see their studies, admins all), create (creator becomes lead), read, rename. */
import { Router } from 'express';
import { In } from 'typeorm';
import { createStudyBodySchema, updateStudyBodySchema, type StudyRole } from '../../shared/api';
import { currentStudy, currentUser } from '../auth/context';
import { MembershipEntity } from '../team/entities';
import { StudyEntity, type Study } from './entities';
import { validate } from '../errors';
import type { RouteDeps } from '../deps';
import { studySummaries } from './service';

export function studiesRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const studies = dataSource.getRepository(StudyEntity);
  const memberships = dataSource.getRepository(MembershipEntity);
  const router = Router();

  router.get('/', auth.requireUser, async (req, res) => {
    const user = currentUser(req);
    const mine = await memberships.findBy({ userId: user.id });
    const roles = new Map<number, StudyRole>(mine.map((m) => [m.studyId, m.role]));
    const rows = user.isAdmin
      ? await studies.find({ order: { name: 'ASC', id: 'ASC' } })
      : await studies.find({ where: { id: In([...roles.keys()]) }, order: { name: 'ASC', id: 'ASC' } });
    res.json({
      studies: await studySummaries(
        dataSource,
        rows.map((study) => ({ study, myRole: roles.get(study.id) ?? null })),
      ),
    });
  });

  router.post('/', auth.requireUser, validate(createStudyBodySchema), async (req, res) => {
    const user = currentUser(req);
    const body = req.body as { name: string; description: string };
    const study: Study = await dataSource.transaction(async (manager) => {
      const created = await manager.getRepository(StudyEntity).save({ name: body.name, description: body.description });
      await manager.getRepository(MembershipEntity).insert({ userId: user.id, studyId: created.id, role: 'lead' });
      return created;
    });
    const [summary] = await studySummaries(dataSource, [{ study, myRole: 'lead' }]);
    res.status(201).json({ study: summary });
  });

  router.get('/:studyId', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const { study, role } = currentStudy(req);
    const [summary] = await studySummaries(dataSource, [{ study, myRole: role }]);
    res.json({ study: summary });
  });

  router.patch(
    '/:studyId',
    auth.requireUser,
    auth.requireStudyRole('manageTeam'),
    validate(updateStudyBodySchema),
    async (req, res) => {
      const { study, role } = currentStudy(req);
      const body = req.body as { name?: string; description?: string };
      if (body.name !== undefined) study.name = body.name;
      if (body.description !== undefined) study.description = body.description;
      const saved = await studies.save(study);
      const [summary] = await studySummaries(dataSource, [{ study: saved, myRole: role }]);
      res.json({ study: summary });
    },
  );

  return router;
}
