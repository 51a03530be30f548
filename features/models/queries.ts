/** Models and fits: cache keys (the API paths), swr hooks with live refresh while a fit runs, and mutations. */
import useSWR, { useSWRConfig } from 'swr';
import { api, type ApiError } from '../api/client';
import { isActive, liveWhile } from '../api/live';
import type {
  FitDetail,
  FitSummary,
  ModelDetail,
  ModelNote,
  ModelSpecBody,
  ModelSummary,
  ModelUpdateBody,
  StartFitBody,
} from '../../shared/models';

export const modelKeys = {
  list: (studyId: number | string) => `/studies/${studyId}/models`,
  check: (studyId: number | string) => `/studies/${studyId}/models/check`,
  detail: (studyId: number | string, modelId: number | string) => `/studies/${studyId}/models/${modelId}`,
  fits: (studyId: number | string, modelId: number | string) => `/studies/${studyId}/models/${modelId}/fits`,
  fit: (studyId: number | string, modelId: number | string, fitId: number | string) => `/studies/${studyId}/models/${modelId}/fits/${fitId}`,
};

export { isActive };

export function useModels(studyId: number | null) {
  return useSWR<{ models: ModelSummary[] }, ApiError>(studyId != null ? modelKeys.list(studyId) : null, {
    refreshInterval: (data) => liveWhile(data?.models.some((m) => m.latestFit && isActive(m.latestFit.state))),
  });
}

export function useModel(studyId: number | null, modelId: number | null) {
  return useSWR<{ model: ModelDetail }, ApiError>(studyId != null && modelId != null ? modelKeys.detail(studyId, modelId) : null);
}

export function useFits(studyId: number | null, modelId: number | null) {
  return useSWR<{ fits: FitSummary[] }, ApiError>(studyId != null && modelId != null ? modelKeys.fits(studyId, modelId) : null, {
    refreshInterval: (data) => liveWhile(data?.fits.some((f) => isActive(f.state))),
  });
}

export function useFit(studyId: number | null, modelId: number | null, fitId: number | null) {
  return useSWR<{ fit: FitDetail }, ApiError>(
    studyId != null && modelId != null && fitId != null ? modelKeys.fit(studyId, modelId, fitId) : null,
    { refreshInterval: (data) => liveWhile(data && isActive(data.fit.state)) },
  );
}

export function useModelMutations(studyId: number) {
  const { mutate } = useSWRConfig();
  const refreshModel = async (modelId: number) => {
    await mutate(modelKeys.detail(studyId, modelId));
    await mutate(modelKeys.fits(studyId, modelId));
    await mutate(modelKeys.list(studyId));
  };
  return {
    async check(body: ModelSpecBody): Promise<ModelNote[]> {
      const { notes } = await api.post<{ notes: ModelNote[] }>(modelKeys.check(studyId), body);
      return notes;
    },
    async create(body: ModelSpecBody): Promise<ModelDetail> {
      const { model } = await api.post<{ model: ModelDetail }>(modelKeys.list(studyId), body);
      await mutate(modelKeys.detail(studyId, model.id), { model }, { revalidate: false });
      await mutate(modelKeys.list(studyId));
      return model;
    },
    async update(modelId: number, body: ModelUpdateBody): Promise<ModelDetail> {
      const { model } = await api.patch<{ model: ModelDetail }>(modelKeys.detail(studyId, modelId), body);
      await mutate(modelKeys.detail(studyId, modelId), { model }, { revalidate: false });
      await mutate(modelKeys.list(studyId));
      return model;
    },
    async remove(modelId: number): Promise<void> {
      await api.del(modelKeys.detail(studyId, modelId));
      await mutate(modelKeys.list(studyId));
    },
    async startFit(modelId: number, body: StartFitBody): Promise<FitDetail> {
      const { fit } = await api.post<{ fit: FitDetail }>(modelKeys.fits(studyId, modelId), body);
      await mutate(modelKeys.fit(studyId, modelId, fit.id), { fit }, { revalidate: false });
      await refreshModel(modelId);
      return fit;
    },
    async cancelFit(modelId: number, fitId: number): Promise<FitDetail> {
      const { fit } = await api.post<{ fit: FitDetail }>(`${modelKeys.fit(studyId, modelId, fitId)}/cancel`);
      await mutate(modelKeys.fit(studyId, modelId, fitId), { fit }, { revalidate: false });
      await refreshModel(modelId);
      return fit;
    },
  };
}
