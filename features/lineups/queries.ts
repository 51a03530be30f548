/** The lineup test: cache keys (API paths), swr hooks and the mutations (make, pick, invite). */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import type { CreateLineupBody, LineupDetail, LineupSummary } from '../../shared/lineups';

type Id = number | string;

export const lineupKeys = {
  ofBatch: (s: Id, b: Id) => `/studies/${s}/batches/${b}/lineups`,
  one: (s: Id, l: Id) => `/studies/${s}/lineups/${l}`,
};

export function useBatchLineups(studyId: number, batchId: number) {
  return useSWR<{ lineups: LineupSummary[] }, ApiError>(lineupKeys.ofBatch(studyId, batchId));
}

export function useLineup(studyId: number | null, lineupId: number | null) {
  return useSWR<LineupDetail, ApiError>(studyId != null && lineupId != null ? lineupKeys.one(studyId, lineupId) : null, { revalidateOnFocus: false });
}

export function useLineupMutations(studyId: number, batchId: number) {
  const { mutate } = useSWRConfig();
  return {
    async create(body: CreateLineupBody): Promise<LineupSummary> {
      const res = await api.post<{ lineup: LineupSummary }>(`/studies/${studyId}/batches/${batchId}/lineups`, body);
      await mutate(lineupKeys.ofBatch(studyId, batchId));
      return res.lineup;
    },
    async pick(lineupId: number, panel: number, reason: string): Promise<LineupDetail> {
      const detail = await api.post<LineupDetail>(`/studies/${studyId}/lineups/${lineupId}/picks`, { panel, reason });
      await mutate(lineupKeys.one(studyId, lineupId), detail, { revalidate: false });
      await mutate(lineupKeys.ofBatch(studyId, batchId));
      return detail;
    },
    async invite(lineupId: number, userIds: number[], message = ''): Promise<{ invited: number[]; alreadyPicked: number[] }> {
      return api.post<{ invited: number[]; alreadyPicked: number[] }>(`/studies/${studyId}/lineups/${lineupId}/invitations`, { userIds, message });
    },
  };
}
