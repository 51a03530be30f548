/** The fit report of a batch: its status (sign-offs) and the lead's sign-off. */
import useSWR from 'swr';
import { api, type ApiError } from '../api/client';
import { useReviewRefresh } from '../board/queries';
import type { ReportStatus, SignoffDto } from '../../shared/review';
import { reportKeys } from './keys';

export { reportKeys };

export function useReportStatus(studyId: number, batchId: number | null) {
  return useSWR<ReportStatus, ApiError>(batchId != null ? reportKeys.report(studyId, batchId) : null);
}

export function useReportMutations(studyId: number, batchId: number) {
  const refresh = useReviewRefresh(studyId, batchId);
  return {
    /** reason: why the lead signs off despite the report's concerns (sent only when there are concerns). */
    async signOff(note: string, reason?: string): Promise<SignoffDto> {
      const body = reason !== undefined ? { note, acknowledgement: { reason } } : { note };
      const res = await api.post<{ signoff: SignoffDto }>(`/studies/${studyId}/batches/${batchId}/report/signoff`, body);
      await refresh();
      return res.signoff;
    },
  };
}
