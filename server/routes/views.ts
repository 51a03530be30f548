/** Rows to response shapes (shared/api.ts), in one place so every route answers alike. */
import type { DataSource } from 'typeorm';
import type { Member, PendingInvitation, StudyRole, StudySummary, UserInfo } from '../../shared/api';
import type { Invitation } from '../db/entities/Invitation';
import type { Membership } from '../db/entities/Membership';
import type { Study } from '../db/entities/Study';
import type { User } from '../db/entities/User';
import { countPerStudy } from '../data/store';

export function userInfo(user: User): UserInfo {
  return { id: user.id, email: user.email, name: user.name, isAdmin: Boolean(user.isAdmin) };
}

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

interface StudyCounts {
  memberCount: number;
  waveCount: number;
  actorCount: number;
}

/** Members, waves and actors per study, for the given study ids. */
export async function studyCounts(dataSource: DataSource, studyIds: number[]): Promise<Map<number, StudyCounts>> {
  const [members, waves, actors] = await Promise.all(
    ['memberships', 'waves', 'actors'].map((table) => countPerStudy(dataSource, table, studyIds)),
  );
  return new Map(
    studyIds.map((id) => [id, { memberCount: members.get(id)!, waveCount: waves.get(id)!, actorCount: actors.get(id)! }]),
  );
}

export async function studySummaries(
  dataSource: DataSource,
  studies: Array<{ study: Study; myRole: StudyRole | null }>,
): Promise<StudySummary[]> {
  const counts = await studyCounts(dataSource, studies.map((s) => s.study.id));
  return studies.map(({ study, myRole }) => ({
    id: study.id,
    name: study.name,
    description: study.description,
    myRole,
    ...counts.get(study.id)!,
    createdAt: study.createdAt.toISOString(),
    updatedAt: study.updatedAt.toISOString(),
  }));
}
