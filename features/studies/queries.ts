/** Studies: cache keys (the API paths), swr hooks and mutations that revalidate the right keys. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import type { CreateStudyBody, StudySummary, UpdateStudyBody } from '../../shared/api';
import type { StudyDataResponse } from '../../shared/data';
import { parseId } from '../api/params';

export const studyKeys = {
  list: () => '/studies',
  detail: (studyId: number | string) => `/studies/${studyId}`,
  /** The study's uploaded data: waves, actors, covariates and their summaries. */
  data: (studyId: number | string) => `/studies/${studyId}/data`,
  /** Every key that belongs to one study (detail, team, and what later features add). */
  isOfStudy: (studyId: number | string) => (key: unknown) =>
    typeof key === 'string' && (key === `/studies/${studyId}` || key.startsWith(`/studies/${studyId}/`)),
};

export function useStudies() {
  return useSWR<{ studies: StudySummary[] }, ApiError>(studyKeys.list());
}

export function useStudy(studyId: number | string | null | undefined) {
  return useSWR<{ study: StudySummary }, ApiError>(studyId != null ? studyKeys.detail(studyId) : null);
}

/** The study's data summaries (the model form and the batch form read the waves and covariates from it). */
export function useStudyData(studyId: number | null) {
  return useSWR<StudyDataResponse, ApiError>(studyId != null ? studyKeys.data(studyId) : null);
}

export function useStudyMutations() {
  const { mutate } = useSWRConfig();
  return {
    async create(body: CreateStudyBody): Promise<StudySummary> {
      const { study } = await api.post<{ study: StudySummary }>('/studies', body);
      await mutate(studyKeys.detail(study.id), { study }, { revalidate: false });
      await mutate(studyKeys.list());
      return study;
    },
    async update(studyId: number, body: UpdateStudyBody): Promise<StudySummary> {
      const { study } = await api.patch<{ study: StudySummary }>(`/studies/${studyId}`, body);
      await mutate(studyKeys.detail(studyId), { study }, { revalidate: false });
      await mutate(studyKeys.list());
      return study;
    },
  };
}

/** Parses the studyId route parameter (parseId of ../api/params.ts); null when it is not a positive whole number. */
export const parseStudyId = parseId;
