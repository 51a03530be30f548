import useSWR from 'swr';
import { api, type ApiError } from '../api/client';
import type { AcceptInvitationBody, InvitationPreview, SessionResponse } from '../../shared/api';

export const invitationKeys = {
  preview: (token: string) => `/invitations/${encodeURIComponent(token)}`,
};

export function useInvitation(token: string | null) {
  return useSWR<InvitationPreview, ApiError>(token ? invitationKeys.preview(token) : null, { revalidateOnFocus: false });
}

export function acceptInvitation(token: string, body: AcceptInvitationBody): Promise<SessionResponse> {
  return api.post<SessionResponse>(`${invitationKeys.preview(token)}/accept`, body);
}
