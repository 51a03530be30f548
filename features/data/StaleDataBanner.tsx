/**
 * A plain caution on a fit or batch made before the study's data were last replaced: its numbers
 * describe data the study no longer holds (the upload's confirmation said so; this keeps saying it).
 */
import { Badge } from '../ui/Badge';
import { Banner } from '../ui/Banner';
import { formatDate } from '../ui/format';
import { useStudyData } from './queries';

/** When the study's data were replaced after `createdAt`, the time of that upload; else null. */
export function useReplacedSince(studyId: number, createdAt: string): string | null {
  const data = useStudyData(studyId);
  const uploadedAt = data.data?.uploadedAt;
  return uploadedAt && new Date(uploadedAt).getTime() > new Date(createdAt).getTime() ? uploadedAt : null;
}

/** A small "Stale data" badge for lists. */
export function StaleBadge({ studyId, createdAt }: { studyId: number; createdAt: string }) {
  return useReplacedSince(studyId, createdAt) ? <Badge label="Stale data" tone="unsure" icon="caution" /> : null;
}

export function StaleDataBanner({ studyId, createdAt, what }: { studyId: number; createdAt: string; what: 'fit' | 'batch' }) {
  const uploadedAt = useReplacedSince(studyId, createdAt);
  if (!uploadedAt) return null;
  return (
    <Banner tone="caution" word="Stale" testID="stale-data">
      The study's data were replaced on {formatDate(uploadedAt)}, after this {what} was made: its {what === 'fit' ? 'estimates describe' : 'simulations and verdicts compare with'} the old
      data, not the waves the study holds now. {what === 'fit' ? 'Fit the model again' : 'Run a new batch from a new fit'} to use the new data.
    </Banner>
  );
}
