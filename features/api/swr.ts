/** The app-wide swr options: one fetcher (the typed client), no retries on 4xx answers. */
import type { SWRConfiguration } from 'swr';
import { ApiError, fetcher } from './client';

export const swrOptions: SWRConfiguration = {
  fetcher: (key: string) => fetcher(key),
  shouldRetryOnError: (err: unknown) => !(err instanceof ApiError && err.status >= 400 && err.status < 500),
  errorRetryCount: 3,
  revalidateOnFocus: true,
  dedupingInterval: 2000,
};
