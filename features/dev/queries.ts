import useSWR from 'swr';
import type { ApiError } from '../api/client';
import type { OutboxMessage } from '../../shared/api';

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
