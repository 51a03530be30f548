/** Comparing batches side by side. */
import useSWR from 'swr';
import type { ApiError } from '../api/client';
import type { CompareResponse } from '../../shared/review';

export const compareKeys = {
  compare: (s: number | string, batches: number[]) => `/studies/${s}/compare?batches=${batches.join(',')}`,
};

export function useCompare(studyId: number, batches: number[]) {
  return useSWR<CompareResponse, ApiError>(batches.length >= 2 ? compareKeys.compare(studyId, batches) : null);
}
