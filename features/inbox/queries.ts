/** The signed-in person's inbox (review requests) and notification preferences. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import type { InboxResponse, NotificationPreferences } from '../../shared/review';

export const inboxKeys = {
  inbox: () => '/me/inbox',
  preferences: () => '/me/notifications',
};

export function useInbox() {
  return useSWR<InboxResponse, ApiError>(inboxKeys.inbox());
}

export function usePreferences() {
  return useSWR<{ preferences: NotificationPreferences }, ApiError>(inboxKeys.preferences());
}

export function usePreferenceMutations() {
  const { mutate } = useSWRConfig();
  return {
    async update(change: Partial<NotificationPreferences>): Promise<NotificationPreferences> {
      const res = await api.patch<{ preferences: NotificationPreferences }>('/me/notifications', change);
      await mutate(inboxKeys.preferences(), res, { revalidate: false });
      return res.preferences;
    },
  };
}
