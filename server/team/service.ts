/** Members and pending invitations of a study as the API shows them (shared/api.ts). */
import type { Member, PendingInvitation } from '../../shared/api';
import type { User } from '../auth/entities';
import type { Invitation } from '../invitations/entities';
import type { Membership } from './entities';

export function memberView(membership: Membership & { user: User }): Member {
  return {
    userId: membership.userId,
    name: membership.user.name,
    email: membership.user.email,
    role: membership.role,
    joinedAt: membership.createdAt.toISOString(),
  };
}

export function invitationView(invitation: Invitation): PendingInvitation {
  return {
    id: invitation.id,
    email: invitation.email,
    role: invitation.role,
    invitedBy: invitation.invitedBy?.name ?? 'a former member',
    createdAt: invitation.createdAt.toISOString(),
    expiresAt: invitation.expiresAt.toISOString(),
  };
}
