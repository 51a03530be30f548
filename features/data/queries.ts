/** Study data: cache keys (the API paths), swr hooks, the dry-run preview and the upload. */
import useSWR, { useSWRConfig } from 'swr';
import { api, getApiBase, type ApiError } from '../api/client';
import { studyKeys } from '../studies/queries';
import type { DataLayoutResponse, DataPreviewResponse, DataUploadBody, DataUploadResponse, StudyDataResponse, WaveTiesResponse } from '../../shared/data';

export const dataKeys = {
  data: (studyId: number | string) => `/studies/${studyId}/data`,
  preview: (studyId: number | string) => `/studies/${studyId}/data/preview`,
  layout: (studyId: number | string) => `/studies/${studyId}/data/layout`,
  wave: (studyId: number | string, index: number) => `/studies/${studyId}/data/waves/${index}`,
};

/** Absolute download URLs (the browser sends the session cookie). */
export const dataDownloads = {
  wave: (studyId: number, index: number) => `${getApiBase()}/studies/${studyId}/data/waves/${index}.csv`,
  actors: (studyId: number) => `${getApiBase()}/studies/${studyId}/data/actors.csv`,
  fixed: (studyId: number) => `${getApiBase()}/studies/${studyId}/data/fixed-pairs.csv`,
};

export function useStudyData(studyId: number | null) {
  return useSWR<StudyDataResponse, ApiError>(studyId != null ? dataKeys.data(studyId) : null);
}

export function useDataLayout(studyId: number | null, hasData: boolean) {
  return useSWR<DataLayoutResponse, ApiError>(studyId != null && hasData ? dataKeys.layout(studyId) : null);
}

export function useWaveTies(studyId: number | null, index: number | null) {
  return useSWR<WaveTiesResponse, ApiError>(studyId != null && index != null ? dataKeys.wave(studyId, index) : null);
}

export function useDataMutations(studyId: number) {
  const { mutate } = useSWRConfig();
  return {
    preview(body: DataUploadBody): Promise<DataPreviewResponse> {
      return api.post<DataPreviewResponse>(dataKeys.preview(studyId), body);
    },
    async store(body: DataUploadBody): Promise<DataUploadResponse> {
      const result = await api.post<DataUploadResponse>(dataKeys.data(studyId), body);
      // Every view of this study (counts on the study page, waves, models' checks) reads the new data.
      await mutate(studyKeys.isOfStudy(studyId));
      await mutate(studyKeys.list());
      return result;
    },
  };
}
