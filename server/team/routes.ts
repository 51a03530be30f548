/**
 * /api/studies/:studyId/members and /invitations: the team of a study.
 * Every member sees the team; only a lead invites, changes roles and removes members, and a study
 * is never left without a lead.
 */
import { Router } from 'express';
import { IsNull, MoreThan, type EntityManager } from 'typeorm';
import {
  changeRoleBodySchema,
  inviteBodySchema,
  type ChangeRoleBody,
  type InviteBody,
  type TeamResponse,
} from '../../shared/api';
import { currentStudy, currentUser } from '../auth/context';
import { newInvitationToken } from '../invitations/tokens';
import { InvitationEntity } from '../invitations/entities';
import { MembershipEntity, type Membership } from './entities';
import { UserEntity, type User } from '../auth/entities';
import { conflict, idParam, notFound, validate } from '../errors';
import { invitationMail } from '../mail/templates';
import type { RouteDeps } from '../deps';
import { invitationView, memberView } from './service';

const DAY_MS = 24 * 60 * 60 * 1000;

async function leadCount(manager: EntityManager, studyId: number): Promise<number> {
  return manager.getRepository(MembershipEntity).countBy({ studyId, role: 'lead' });
}

export function teamRouter(deps: RouteDeps): Router {
  const { dataSource, config, mailer, auth } = deps;
  const memberships = dataSource.getRepository(MembershipEntity);
  const invitations = dataSource.getRepository(InvitationEntity);
  const users = dataSource.getRepository(UserEntity);
  const router = Router();
  const lead = [auth.requireUser, auth.requireStudyRole('manageTeam')];

  router.get('/:studyId/members', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const { study } = currentStudy(req);
    const members = await memberships.find({
      where: { studyId: study.id },
      relations: { user: true },
      order: { createdAt: 'ASC', id: 'ASC' },
    });
    const pending = await invitations.find({
      where: { studyId: study.id, acceptedAt: IsNull(), expiresAt: MoreThan(new Date()) },
      relations: { invitedBy: true },
      order: { createdAt: 'ASC', id: 'ASC' },
    });
    const body: TeamResponse = {
      members: members.map((m) => memberView(m as Membership & { user: User })),
      invitations: pending.map(invitationView),
    };
    res.json(body);
  });

  router.post('/:studyId/invitations', ...lead, validate(inviteBodySchema), async (req, res) => {
    const { study } = currentStudy(req);
    const inviter = currentUser(req);
    const body = req.body as InviteBody;
    const invitee = await users.findOneBy({ email: body.email });
    if (invitee && (await memberships.countBy({ studyId: study.id, userId: invitee.id })) > 0) {
      throw conflict('already_member', `${body.email} is a member of this study already.`);
    }
    const { token, tokenHash } = newInvitationToken();
    const expiresAt = new Date(Date.now() + config.invitationDays * DAY_MS);
    // A new invitation to the same address replaces any earlier open one.
    const saved = await dataSource.transaction(async (manager) => {
      const repo = manager.getRepository(InvitationEntity);
      await repo.delete({ studyId: study.id, email: body.email, acceptedAt: IsNull() });
      return repo.save({
        email: body.email,
        studyId: study.id,
        role: body.role,
        tokenHash,
        invitedById: inviter.id,
        expiresAt,
        acceptedAt: null,
      });
    });
    try {
      await mailer.send(
        invitationMail({
          to: body.email,
          studyName: study.name,
          role: body.role,
          invitedBy: inviter.name,
          link: `${config.publicUrl}/invite/${token}`,
          expiresAt,
        }),
      );
    } catch (error) {
      // The link went nowhere, so the invitation must not linger as if it had been sent.
      await invitations.delete({ id: saved.id });
      throw error;
    }
    const invitation = await invitations.findOneOrFail({ where: { id: saved.id }, relations: { invitedBy: true } });
    res.status(201).json({ invitation: invitationView(invitation) });
  });

  router.delete('/:studyId/invitations/:invitationId', ...lead, async (req, res) => {
    const { study } = currentStudy(req);
    const id = idParam(req, 'invitationId', 'Invitation');
    const result = await invitations.delete({ id, studyId: study.id, acceptedAt: IsNull() });
    if (!result.affected) throw notFound('Invitation not found.');
    res.status(204).end();
  });

  router.patch('/:studyId/members/:userId', ...lead, validate(changeRoleBodySchema), async (req, res) => {
    const { study } = currentStudy(req);
    const userId = idParam(req, 'userId', 'Member');
    const { role } = req.body as ChangeRoleBody;
    const updated = await dataSource.transaction(async (manager) => {
      const repo = manager.getRepository(MembershipEntity);
      const membership = await repo.findOne({ where: { studyId: study.id, userId }, relations: { user: true } });
      if (!membership) throw notFound('Member not found.');
      if (membership.role === 'lead' && role !== 'lead' && (await leadCount(manager, study.id)) <= 1) {
        throw conflict('last_lead', 'A study needs at least one lead: make another member lead first.');
      }
      membership.role = role;
      await repo.update({ id: membership.id }, { role });
      return membership as Membership & { user: User };
    });
    res.json({ member: memberView(updated) });
  });

  router.delete('/:studyId/members/:userId', ...lead, async (req, res) => {
    const { study } = currentStudy(req);
    const userId = idParam(req, 'userId', 'Member');
    await dataSource.transaction(async (manager) => {
      const repo = manager.getRepository(MembershipEntity);
      const membership = await repo.findOneBy({ studyId: study.id, userId });
      if (!membership) throw notFound('Member not found.');
      if (membership.role === 'lead' && (await leadCount(manager, study.id)) <= 1) {
        throw conflict('last_lead', 'A study needs at least one lead: make another member lead before removing this one.');
      }
      await repo.delete({ id: membership.id });
    });
    res.status(204).end();
  });

  return router;
}
