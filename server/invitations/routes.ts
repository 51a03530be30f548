/**
 * /api/invitations/:token — the public side of an invitation: preview it, accept it.
 * Accepting creates the account (or, when the e-mail has one, checks its password), adds the
 * membership, marks the invitation used and signs the person in.
 */
import { Router, type Request } from 'express';
import { acceptInvitationBodySchema, type AcceptInvitationBody, type InvitationPreview } from '../../shared/api';
import { markWrongPassword } from '../auth/guessLimits';
import { hashInvitationToken } from './tokens';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { InvitationEntity, type Invitation } from './entities';
import { MembershipEntity } from '../team/entities';
import { UserEntity, type User } from '../auth/entities';
import { ApiError, notFound, validate } from '../errors';
import { sessionResponse } from '../auth/routes';
import type { RouteDeps } from '../deps';

export function invitationsRouter(deps: RouteDeps): Router {
  const { dataSource, config, auth } = deps;
  const invitations = dataSource.getRepository(InvitationEntity);
  const users = dataSource.getRepository(UserEntity);
  const router = Router();

  /** The invitation of :token, if it can still be used. */
  async function usableInvitation(req: Request): Promise<Invitation> {
    const token = String(req.params.token ?? '');
    const invitation = /^[A-Za-z0-9_-]{20,100}$/.test(token)
      ? await invitations.findOne({
          where: { tokenHash: hashInvitationToken(token) },
          relations: { study: true, invitedBy: true },
        })
      : null;
    if (!invitation) throw notFound('This invitation link is not valid. Ask the study lead for a new one.');
    if (invitation.acceptedAt) {
      throw new ApiError(410, 'invitation_used', 'This invitation has been used already. Sign in instead.');
    }
    if (invitation.expiresAt.getTime() <= Date.now()) {
      throw new ApiError(410, 'invitation_expired', 'This invitation has expired. Ask the study lead for a new one.');
    }
    return invitation;
  }

  router.get('/:token', async (req, res) => {
    const invitation = await usableInvitation(req);
    const accountExists = (await users.countBy({ email: invitation.email })) > 0;
    const preview: InvitationPreview = {
      email: invitation.email,
      role: invitation.role,
      studyName: invitation.study!.name,
      invitedBy: invitation.invitedBy?.name ?? 'a former member',
      expiresAt: invitation.expiresAt.toISOString(),
      accountExists,
    };
    res.json(preview);
  });

  // Guessing an existing account's password through an invitation counts like a wrong sign-in.
  const acceptGuesses = auth.guessLimits.guard(async (req) => {
    const token = String(req.params.token ?? '');
    if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return null;
    return (await invitations.findOneBy({ tokenHash: hashInvitationToken(token) }))?.email ?? null;
  });
  router.post('/:token/accept', validate(acceptInvitationBodySchema), ...acceptGuesses, async (req, res) => {
    const body = req.body as AcceptInvitationBody;
    const invitation = await usableInvitation(req);
    const existing = await users.findOneBy({ email: invitation.email });
    if (existing && !(await verifyPassword(existing.passwordHash, body.password))) {
      markWrongPassword(res);
      throw new ApiError(
        401,
        'invalid_credentials',
        `An account for ${invitation.email} exists already: enter its password to accept.`,
      );
    }
    const newHash = existing ? null : await hashPassword(body.password, config.passwordHash);
    const user: User = await dataSource.transaction(async (manager) => {
      // Mark it used first, guarded on acceptedAt, so two simultaneous accepts cannot both succeed.
      const marked = await manager
        .createQueryBuilder()
        .update(InvitationEntity)
        .set({ acceptedAt: new Date() })
        .where('id = :id AND acceptedAt IS NULL', { id: invitation.id })
        .execute();
      if (!marked.affected) {
        throw new ApiError(410, 'invitation_used', 'This invitation has been used already. Sign in instead.');
      }
      const person =
        existing ??
        (await manager.getRepository(UserEntity).save({
          email: invitation.email,
          name: body.name,
          passwordHash: newHash!,
          isAdmin: false,
        }));
      const memberships = manager.getRepository(MembershipEntity);
      const membership = await memberships.findOneBy({ userId: person.id, studyId: invitation.studyId });
      if (!membership) {
        await memberships.insert({ userId: person.id, studyId: invitation.studyId, role: invitation.role });
      }
      return person;
    });
    const session = auth.startSession(res, user);
    res.json(sessionResponse(user, session.token, session.expiresAt));
  });

  return router;
}
