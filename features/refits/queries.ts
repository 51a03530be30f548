/** Re-fit studies: cache keys (the API paths), swr hooks with live refresh while a study runs, and mutations. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import { isActive, liveWhile } from '../api/live';
import type { CreateRefitBody, RefitResults, RefitSummary } from '../../shared/refits';

export const refitKeys = {
  list: (studyId: number | string) => `/studies/${studyId}/refits`,
  detail: (studyId: number | string, refitId: number | string) => `/studies/${studyId}/refits/${refitId}`,
  results: (studyId: number | string, refitId: number | string, include: 'converged' | 'all') => `/studies/${studyId}/refits/${refitId}/results?include=${include}`,
  csv: (studyId: number | string, refitId: number | string, include: 'converged' | 'all', each: boolean) =>
    `/api/studies/${studyId}/refits/${refitId}/results.csv?include=${include}${each ? '&rows=each' : ''}`,
};

export function useRefits(studyId: number | null) {
  return useSWR<{ refits: RefitSummary[] }, ApiError>(studyId != null ? refitKeys.list(studyId) : null, {
    refreshInterval: (data) => liveWhile(data?.refits.some((r) => isActive(r.state))),
  });
}

export function useRefit(studyId: number | null, refitId: number | null) {
  return useSWR<{ refit: RefitSummary }, ApiError>(studyId != null && refitId != null ? refitKeys.detail(studyId, refitId) : null, {
    refreshInterval: (data) => liveWhile(data && isActive(data.refit.state)),
  });
}

export function useRefitResults(studyId: number, refit: RefitSummary | undefined, include: 'converged' | 'all') {
  const ready = refit && (refit.state === 'done' || ((refit.state === 'cancelled' || refit.state === 'failed') && refit.refitsDone > 0));
  return useSWR<RefitResults, ApiError>(ready ? refitKeys.results(studyId, refit!.id, include) : null);
}

export function useRefitMutations(studyId: number) {
  const { mutate } = useSWRConfig();
  return {
    async create(body: CreateRefitBody): Promise<RefitSummary> {
      const { refit } = await api.post<{ refit: RefitSummary }>(refitKeys.list(studyId), body);
      await mutate(refitKeys.detail(studyId, refit.id), { refit }, { revalidate: false });
      await mutate(refitKeys.list(studyId));
      return refit;
    },
    async cancel(refitId: number): Promise<RefitSummary> {
      const { refit } = await api.post<{ refit: RefitSummary }>(`${refitKeys.detail(studyId, refitId)}/cancel`);
      await mutate(refitKeys.detail(studyId, refitId), { refit }, { revalidate: false });
      await mutate(refitKeys.list(studyId));
      return refit;
    },
  };
}
