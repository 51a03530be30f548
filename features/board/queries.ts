/** The review board: cache keys (API paths), swr hooks and mutations that revalidate the right keys. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import { inboxKeys } from '../inbox/queries';
import { reportKeys } from '../report/keys';
import type {
  BoardResponse,
  CommentDto,
  EnvelopeChartDto,
  ReviewRequestDto,
  Verdict,
  VerdictChange,
  VerdictDto,
} from '../../shared/review';

type Id = number | string;

export const boardKeys = {
  board: (s: Id, b: Id) => `/studies/${s}/batches/${b}/board`,
  chart: (s: Id, b: Id, statistic: string, period: number | 'all') => `/studies/${s}/batches/${b}/board/chart?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  history: (s: Id, b: Id, statistic: string, period: number) => `/studies/${s}/batches/${b}/verdicts/history?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  comments: (s: Id, b: Id, statistic: string, period: number) => `/studies/${s}/batches/${b}/comments?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  /** Every key that belongs to one batch's review. */
  isOfBatch: (s: Id, b: Id) => (key: unknown) => typeof key === 'string' && key.startsWith(`/studies/${s}/batches/${b}/`),
};

export function useBoard(studyId: number | null, batchId: number | null) {
  return useSWR<BoardResponse, ApiError>(studyId != null && batchId != null ? boardKeys.board(studyId, batchId) : null);
}

export function useChart(studyId: number, batchId: number, statistic: string, period: number | 'all') {
  return useSWR<EnvelopeChartDto, ApiError>(boardKeys.chart(studyId, batchId, statistic, period), { revalidateOnFocus: false });
}

export function useHistory(studyId: number, batchId: number, statistic: string, period: number, open: boolean) {
  return useSWR<{ history: VerdictChange[] }, ApiError>(open ? boardKeys.history(studyId, batchId, statistic, period) : null);
}

export function useComments(studyId: number, batchId: number, statistic: string, period: number, open: boolean) {
  return useSWR<{ comments: CommentDto[] }, ApiError>(open ? boardKeys.comments(studyId, batchId, statistic, period) : null);
}

/** After a change to a batch's review: its board, the card's history and comments, its report status and the inbox. */
export function useReviewRefresh(studyId: number, batchId: number) {
  const { mutate } = useSWRConfig();
  return async (statistic?: string, period?: number) => {
    await mutate(boardKeys.board(studyId, batchId));
    if (statistic && period) {
      await mutate(boardKeys.history(studyId, batchId, statistic, period));
      await mutate(boardKeys.comments(studyId, batchId, statistic, period));
    }
    await mutate(reportKeys.report(studyId, batchId));
    await mutate(inboxKeys.inbox());
  };
}

export function useBoardMutations(studyId: number, batchId: number) {
  const refresh = useReviewRefresh(studyId, batchId);
  const base = `/studies/${studyId}/batches/${batchId}`;
  return {
    /** Saves a verdict from the version last seen; a stale version throws ApiError 409 verdict_conflict. */
    async saveVerdict(card: { statistic: string; period: number }, verdict: Verdict, note: string, version: number): Promise<VerdictDto> {
      try {
        const res = await api.post<{ verdict: VerdictDto }>(`${base}/verdicts`, { ...card, verdict, note, version });
        return res.verdict;
      } finally {
        await refresh(card.statistic, card.period);
      }
    },
    async addComment(card: { statistic: string; period: number }, body: string): Promise<CommentDto> {
      const res = await api.post<{ comment: CommentDto }>(`${base}/comments`, { ...card, body });
      await refresh(card.statistic, card.period);
      return res.comment;
    },
    async requestReview(userIds: number[], message: string): Promise<{ requests: ReviewRequestDto[]; asked: number[]; alreadyAsked: number[] }> {
      const res = await api.post<{ requests: ReviewRequestDto[]; asked: number[]; alreadyAsked: number[] }>(`${base}/review-requests`, { userIds, message });
      await refresh();
      return res;
    },
    async completeRequest(requestId: number): Promise<ReviewRequestDto> {
      const res = await api.post<{ request: ReviewRequestDto }>(`/studies/${studyId}/review-requests/${requestId}/complete`);
      await refresh();
      return res.request;
    },
  };
}
