/**
 * A plain caution on a fit or batch made before the study's data were last replaced: its numbers
 * describe data the study no longer holds (the upload's confirmation said so; this keeps saying it).
 */
import { Banner } from '../ui/Banner';
import { formatDate } from '../ui/format';
import { useStudyData } from './queries';

export function StaleDataBanner({ studyId, createdAt, what }: { studyId: number; createdAt: string; what: 'fit' | 'batch' }) {
  const data = useStudyData(studyId);
  const uploadedAt = data.data?.uploadedAt;
  if (!uploadedAt || new Date(uploadedAt).getTime() <= new Date(createdAt).getTime()) return null;
  return (
    <Banner tone="caution" word="Stale" testID="stale-data">
      The study's data were replaced on {formatDate(uploadedAt)}, after this {what} was made: its {what === 'fit' ? 'estimates describe' : 'simulations and verdicts compare with'} the old
      data, not the waves the study holds now. {what === 'fit' ? 'Fit the model again' : 'Run a new batch from a new fit'} to use the new data.
    </Banner>
  );
}
