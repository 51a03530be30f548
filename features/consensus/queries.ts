/** The consensus network drawing of a batch period. */
import useSWR from 'swr';
import type { ApiError } from '../api/client';
import type { ConsensusLayoutDto } from '../../shared/review';

export const consensusKeys = {
  layout: (s: number | string, b: number | string, period: number) => `/studies/${s}/batches/${b}/consensus/layout?period=${period}`,
};

export function useConsensusLayout(studyId: number, batchId: number | null, period: number | null) {
  return useSWR<ConsensusLayoutDto, ApiError>(batchId != null && period != null ? consensusKeys.layout(studyId, batchId, period) : null, {
    revalidateOnFocus: false,
  });
}
