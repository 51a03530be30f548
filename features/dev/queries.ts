import useSWR from 'swr';
import type { ApiError } from '../api/client';
import type { HealthResponse, OutboxMessage, UserInfo } from '../../shared/api';

export const outboxKey = '/dev/outbox';

/** The development server's fake outbox; a 404 means this server is a production one. */
export function useOutbox(options: { poll?: boolean } | boolean = {}) {
  const enabled = options !== false;
  const poll = typeof options === 'object' && options.poll;
  return useSWR<{ messages: OutboxMessage[] }, ApiError>(enabled ? outboxKey : null, {
    refreshInterval: poll ? 5000 : 0,
    shouldRetryOnError: false,
  });
}

/** The server's health answer (read once per session; it does not change while the server runs). */
export function useHealth(enabled = true) {
  return useSWR<HealthResponse, ApiError>(enabled ? '/health' : null, { revalidateOnFocus: false, shouldRetryOnError: false });
}

/**
 * Whether the navigation shows the Outbox: only to a site admin, and only when the server says it
 * mounts the development outbox (a missing `devOutbox` counts as false).
 */
export function showsOutbox(user: UserInfo | null | undefined, health: HealthResponse | undefined): boolean {
  return user?.isAdmin === true && health?.devOutbox === true;
}
