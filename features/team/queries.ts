/** The team of a study: members, pending invitations, and the lead's changes to them. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import { studyKeys } from '../studies/queries';
import type { InviteBody, Member, PendingInvitation, StudyRole, TeamResponse } from '../../shared/api';

export const teamKeys = {
  team: (studyId: number | string) => `/studies/${studyId}/members`,
};

export function useTeam(studyId: number | null) {
  return useSWR<TeamResponse, ApiError>(studyId != null ? teamKeys.team(studyId) : null);
}

export function useTeamMutations(studyId: number) {
  const { mutate } = useSWRConfig();
  /** Member counts show on the study and in the list, so all three are revalidated. */
  const revalidate = async () => {
    await Promise.all([mutate(teamKeys.team(studyId)), mutate(studyKeys.detail(studyId)), mutate(studyKeys.list())]);
  };
  return {
    async invite(body: InviteBody): Promise<PendingInvitation> {
      const { invitation } = await api.post<{ invitation: PendingInvitation }>(`/studies/${studyId}/invitations`, body);
      await revalidate();
      return invitation;
    },
    async revokeInvitation(invitationId: number): Promise<void> {
      await api.del(`/studies/${studyId}/invitations/${invitationId}`);
      await revalidate();
    },
    async changeRole(userId: number, role: StudyRole): Promise<Member> {
      const { member } = await api.patch<{ member: Member }>(`/studies/${studyId}/members/${userId}`, { role });
      await revalidate();
      return member;
    },
    async removeMember(userId: number): Promise<void> {
      await api.del(`/studies/${studyId}/members/${userId}`);
      await revalidate();
    },
  };
}
