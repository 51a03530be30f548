/** Explore: cache keys (the API paths) and swr hooks. Everything is recomputed by the server from seeds. */
import useSWR from 'swr';
import type { ApiError } from '../api/client';
import type { ChoiceResponse, OverviewResponse, ReplayResponse, TimelinesResponse } from '../../shared/explore';

export const exploreKeys = {
  choices: (studyId: number, fitId: number, period: number, actor: number) => `/studies/${studyId}/explore/fits/${fitId}/choices?period=${period}&actor=${actor}`,
  overview: (studyId: number, fitId: number, period: number, order: string) =>
    `/studies/${studyId}/explore/fits/${fitId}/overview?period=${period}&order=${encodeURIComponent(order)}`,
  replay: (studyId: number, batchId: number, period: number, chain: number) => `/studies/${studyId}/explore/batches/${batchId}/replay?period=${period}&chain=${chain}`,
  timelines: (studyId: number, batchId: number, period: number, pairs: Array<[number, number]>, chains: number | null) =>
    `/studies/${studyId}/explore/batches/${batchId}/timelines?period=${period}&pairs=${pairs.map(([i, j]) => `${i}-${j}`).join(',')}${chains ? `&chains=${chains}` : ''}`,
};

const once = { revalidateOnFocus: false, dedupingInterval: 60_000 };

export function useChoices(studyId: number | null, fitId: number | null, period: number | null, actor: number | null) {
  const ok = studyId != null && fitId != null && period != null && actor != null;
  return useSWR<ChoiceResponse, ApiError>(ok ? exploreKeys.choices(studyId!, fitId!, period!, actor!) : null, once);
}

export function useOverview(studyId: number | null, fitId: number | null, period: number | null, order: string) {
  const ok = studyId != null && fitId != null && period != null;
  return useSWR<OverviewResponse, ApiError>(ok ? exploreKeys.overview(studyId!, fitId!, period!, order) : null, { ...once, keepPreviousData: true });
}

export function useReplay(studyId: number | null, batchId: number | null, period: number | null, chain: number | null) {
  const ok = studyId != null && batchId != null && period != null && chain != null;
  return useSWR<ReplayResponse, ApiError>(ok ? exploreKeys.replay(studyId!, batchId!, period!, chain!) : null, once);
}

export function useTimelines(studyId: number | null, batchId: number | null, period: number | null, pairs: Array<[number, number]>, chains: number | null) {
  const ok = studyId != null && batchId != null && period != null && pairs.length > 0;
  return useSWR<TimelinesResponse, ApiError>(ok ? exploreKeys.timelines(studyId!, batchId!, period!, pairs, chains) : null, { ...once, keepPreviousData: true });
}
