/** Batches: cache keys (the API paths), swr hooks with live refresh while a batch runs, and mutations. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import { isActive, liveWhile } from '../api/live';
import type {
  GofPeriod,
  BatchDetail,
  BatchSummary,
  ConsensusResponse,
  CreateBatchBody,
  GofResponse,
  GofSummaryResponse,
} from '../../shared/batches';

export const batchKeys = {
  list: (studyId: number | string) => `/studies/${studyId}/batches`,
  detail: (studyId: number | string, batchId: number | string) => `/studies/${studyId}/batches/${batchId}`,
  summary: (studyId: number | string, batchId: number | string, period: GofPeriod) =>
    `/studies/${studyId}/batches/${batchId}/gof/summary?period=${period}`,
  gof: (studyId: number | string, batchId: number | string, statistic: string, period: GofPeriod) =>
    `/studies/${studyId}/batches/${batchId}/gof?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  consensus: (studyId: number | string, batchId: number | string, period: number, threshold: number) =>
    `/studies/${studyId}/batches/${batchId}/consensus?period=${period}&threshold=${threshold}`,
  csv: (studyId: number | string, batchId: number | string, statistic: string, period: number) =>
    `/api/studies/${studyId}/batches/${batchId}/statistics.csv?statistic=${encodeURIComponent(statistic)}&period=${period}`,
};

export function useBatches(studyId: number | null) {
  return useSWR<{ batches: BatchSummary[] }, ApiError>(studyId != null ? batchKeys.list(studyId) : null, {
    refreshInterval: (data) => liveWhile(data?.batches.some((b) => isActive(b.state))),
  });
}

export function useBatch(studyId: number | null, batchId: number | null) {
  return useSWR<{ batch: BatchDetail }, ApiError>(studyId != null && batchId != null ? batchKeys.detail(studyId, batchId) : null, {
    refreshInterval: (data) => liveWhile(data && isActive(data.batch.state)),
  });
}

export function useGofSummary(studyId: number, batch: BatchDetail | undefined, period: GofPeriod | null) {
  const ready = batch?.state === 'done' && period != null;
  return useSWR<GofSummaryResponse, ApiError>(ready ? batchKeys.summary(studyId, batch!.id, period!) : null);
}

export function useGof(studyId: number, batch: BatchDetail | undefined, statistic: string | null, period: GofPeriod | null) {
  const ready = batch?.state === 'done' && statistic != null && period != null;
  return useSWR<GofResponse, ApiError>(ready ? batchKeys.gof(studyId, batch!.id, statistic!, period!) : null);
}

export function useConsensus(studyId: number, batch: BatchDetail | undefined, period: number | null, threshold: number) {
  const ready = batch?.state === 'done' && period != null;
  return useSWR<ConsensusResponse, ApiError>(ready ? batchKeys.consensus(studyId, batch!.id, period!, threshold) : null);
}

export function useBatchMutations(studyId: number) {
  const { mutate } = useSWRConfig();
  return {
    async create(body: CreateBatchBody): Promise<BatchDetail> {
      const { batch } = await api.post<{ batch: BatchDetail }>(batchKeys.list(studyId), body);
      await mutate(batchKeys.detail(studyId, batch.id), { batch }, { revalidate: false });
      await mutate(batchKeys.list(studyId));
      return batch;
    },
    async cancel(batchId: number): Promise<BatchDetail> {
      const { batch } = await api.post<{ batch: BatchDetail }>(`${batchKeys.detail(studyId, batchId)}/cancel`);
      await mutate(batchKeys.detail(studyId, batchId), { batch }, { revalidate: false });
      await mutate(batchKeys.list(studyId));
      return batch;
    },
  };
}
