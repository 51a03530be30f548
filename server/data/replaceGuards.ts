/**
 * What stands in the way of replacing a study's data, because stored work depends on it.
 * - `dataReplaceInfo` counts models, fits and batches built on the stored data (they become stale
 *   when it is replaced, so replacing them needs the uploader's confirmation) and the fits and
 *   batches still queued or running (their workers read the data, so replacing waits for them).
 * - `DATA_REPLACE_GUARDS` are the hooks `replaceStudyData` runs inside its transaction, before
 *   anything is deleted. A guard returns null to allow, or the message of the 409 data_in_use
 *   refusal. Add one here when a new kind of stored work depends on the data.
 */
import { In, type EntityManager } from 'typeorm';
import type { DataReplaceInfo } from '../../shared/data';
import { BatchEntity } from '../batches/entities';
import { WaveEntity } from './entities';
import { FitEntity, ModelSpecEntity } from '../models/entities';

export interface ReplaceContext {
  /** The uploader confirmed that dependent work becomes stale. */
  confirmed: boolean;
}

export type DataReplaceGuard = (manager: EntityManager, studyId: number, context: ReplaceContext) => Promise<string | null>;

const ACTIVE = ['queued', 'running'];

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : word.endsWith('h') ? 'es' : 's'}`;
}

export async function dataReplaceInfo(manager: EntityManager, studyId: number): Promise<DataReplaceInfo> {
  const [waves, models, fits, batches, runningFits, runningBatches] = await Promise.all([
    manager.getRepository(WaveEntity).countBy({ studyId }),
    manager.getRepository(ModelSpecEntity).countBy({ studyId }),
    manager.getRepository(FitEntity).countBy({ studyId }),
    manager.getRepository(BatchEntity).countBy({ studyId }),
    manager.getRepository(FitEntity).countBy({ studyId, state: In(ACTIVE) }),
    manager
      .getRepository(BatchEntity)
      .createQueryBuilder('b')
      .innerJoin('jobs', 'j', 'j.id = b.jobId')
      .where('b.studyId = :studyId', { studyId })
      .andWhere('j.state IN (:...active)', { active: ACTIVE })
      .getCount(),
  ]);
  const parts: string[] = [];
  if (models) parts.push(plural(models, 'model'));
  if (fits) parts.push(plural(fits, 'fit'));
  if (batches) parts.push(plural(batches, 'batch'));
  const stale =
    waves > 0 && parts.length
      ? `${parts.join(', ')} ${models + fits + batches === 1 ? 'was' : 'were'} built on the data stored now. ` +
        'They stay in the study, but their estimates, simulations and verdicts describe the old data, not the new: treat them as stale and fit again.'
      : null;
  return {
    hasData: waves > 0,
    models,
    fits,
    batches,
    running: runningFits + runningBatches,
    needsConfirmation: stale !== null,
    stale,
  };
}

export const DATA_REPLACE_GUARDS: readonly DataReplaceGuard[] = [
  async (manager, studyId) => {
    const info = await dataReplaceInfo(manager, studyId);
    return info.running > 0
      ? `${info.running === 1 ? 'A fit or batch is' : `${info.running} fits or batches are`} still queued or running on the stored data; wait until ${info.running === 1 ? 'it ends' : 'they end'} (or cancel ${info.running === 1 ? 'it' : 'them'}) before replacing the data.`
      : null;
  },
  async (manager, studyId, { confirmed }) => {
    if (confirmed) return null;
    const info = await dataReplaceInfo(manager, studyId);
    return info.stale ? `${info.stale} Confirm the replacement to go ahead.` : null;
  },
];
