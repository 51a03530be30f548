/** The review board: cache keys (API paths), swr hooks and mutations that revalidate the right keys. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import type {
  BoardResponse,
  CommentDto,
  CompareResponse,
  ConsensusLayoutDto,
  EnvelopeChartDto,
  InboxResponse,
  NotificationPreferences,
  ReportStatus,
  ReviewRequestDto,
  SignoffDto,
  Verdict,
  VerdictChange,
  VerdictDto,
} from '../../shared/review';

type Id = number | string;

export const boardKeys = {
  board: (s: Id, b: Id) => `/studies/${s}/batches/${b}/board`,
  chart: (s: Id, b: Id, statistic: string, period: number) => `/studies/${s}/batches/${b}/board/chart?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  history: (s: Id, b: Id, statistic: string, period: number) => `/studies/${s}/batches/${b}/verdicts/history?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  comments: (s: Id, b: Id, statistic: string, period: number) => `/studies/${s}/batches/${b}/comments?statistic=${encodeURIComponent(statistic)}&period=${period}`,
  layout: (s: Id, b: Id, period: number) => `/studies/${s}/batches/${b}/consensus/layout?period=${period}`,
  compare: (s: Id, batches: number[]) => `/studies/${s}/compare?batches=${batches.join(',')}`,
  report: (s: Id, b: Id) => `/studies/${s}/batches/${b}/report`,
  inbox: () => '/me/inbox',
  preferences: () => '/me/notifications',
  /** Every key that belongs to one batch's review. */
  isOfBatch: (s: Id, b: Id) => (key: unknown) => typeof key === 'string' && key.startsWith(`/studies/${s}/batches/${b}/`),
};

export function useBoard(studyId: number | null, batchId: number | null) {
  return useSWR<BoardResponse, ApiError>(studyId != null && batchId != null ? boardKeys.board(studyId, batchId) : null);
}

export function useChart(studyId: number, batchId: number, statistic: string, period: number) {
  return useSWR<EnvelopeChartDto, ApiError>(boardKeys.chart(studyId, batchId, statistic, period), { revalidateOnFocus: false });
}

export function useHistory(studyId: number, batchId: number, statistic: string, period: number, open: boolean) {
  return useSWR<{ history: VerdictChange[] }, ApiError>(open ? boardKeys.history(studyId, batchId, statistic, period) : null);
}

export function useComments(studyId: number, batchId: number, statistic: string, period: number, open: boolean) {
  return useSWR<{ comments: CommentDto[] }, ApiError>(open ? boardKeys.comments(studyId, batchId, statistic, period) : null);
}

export function useConsensusLayout(studyId: number, batchId: number | null, period: number | null) {
  return useSWR<ConsensusLayoutDto, ApiError>(batchId != null && period != null ? boardKeys.layout(studyId, batchId, period) : null, { revalidateOnFocus: false });
}

export function useCompare(studyId: number, batches: number[]) {
  return useSWR<CompareResponse, ApiError>(batches.length >= 2 ? boardKeys.compare(studyId, batches) : null);
}

export function useReportStatus(studyId: number, batchId: number | null) {
  return useSWR<ReportStatus, ApiError>(batchId != null ? boardKeys.report(studyId, batchId) : null);
}

export function useInbox() {
  return useSWR<InboxResponse, ApiError>(boardKeys.inbox());
}

export function usePreferences() {
  return useSWR<{ preferences: NotificationPreferences }, ApiError>(boardKeys.preferences());
}

export function useBoardMutations(studyId: number, batchId: number) {
  const { mutate } = useSWRConfig();
  const base = `/studies/${studyId}/batches/${batchId}`;
  const refresh = async (statistic?: string, period?: number) => {
    await mutate(boardKeys.board(studyId, batchId));
    if (statistic && period) {
      await mutate(boardKeys.history(studyId, batchId, statistic, period));
      await mutate(boardKeys.comments(studyId, batchId, statistic, period));
    }
    await mutate(boardKeys.report(studyId, batchId));
    await mutate(boardKeys.inbox());
  };
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
    /** reason: why the lead signs off despite the report's concerns (sent only when there are concerns). */
    async signOff(note: string, reason?: string): Promise<SignoffDto> {
      const res = await api.post<{ signoff: SignoffDto }>(`${base}/report/signoff`, reason !== undefined ? { note, acknowledgement: { reason } } : { note });
      await refresh();
      return res.signoff;
    },
  };
}

export function usePreferenceMutations() {
  const { mutate } = useSWRConfig();
  return {
    async update(change: Partial<NotificationPreferences>): Promise<NotificationPreferences> {
      const res = await api.patch<{ preferences: NotificationPreferences }>('/me/notifications', change);
      await mutate(boardKeys.preferences(), res, { revalidate: false });
      return res.preferences;
    },
  };
}

/** Parses a route id parameter; null unless a positive whole number. */
export function parseId(raw: string | string[] | undefined): number | null {
  const v = Array.isArray(raw) ? raw[0] : raw;
  return v && /^[1-9][0-9]{0,15}$/.test(v) ? Number(v) : null;
}

/** Parses "1,2,3" from a query parameter into ids (invalid parts dropped). */
export function parseIds(raw: string | string[] | undefined): number[] {
  const v = Array.isArray(raw) ? raw.join(',') : raw ?? '';
  return [...new Set(v.split(',').map((p) => p.trim()).filter((p) => /^[1-9][0-9]{0,15}$/.test(p)).map(Number))];
}
