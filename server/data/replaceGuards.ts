/**
 * Hooks that may refuse replacing a study's data, because stored work depends on it.
 *
 * HOOK for later engineers: when model specifications, fits or batches are stored, add a guard
 * here, e.g.
 *   async (manager, studyId) =>
 *     (await manager.getRepository(ModelSpecEntity).countBy({ studyId })) > 0
 *       ? 'This study has models; delete them (or start a new study) before replacing its data.'
 *       : null,
 * A guard returns null to allow, or the message of the 409 data_in_use refusal. Guards run inside
 * the upload's transaction, before anything is deleted.
 */
import type { EntityManager } from 'typeorm';
import { BatchEntity } from '../batches/entities';
import { ModelSpecEntity } from '../models/entities';

export type DataReplaceGuard = (manager: EntityManager, studyId: number) => Promise<string | null>;

export const DATA_REPLACE_GUARDS: readonly DataReplaceGuard[] = [
  async (manager, studyId) =>
    (await manager.getRepository(ModelSpecEntity).countBy({ studyId })) > 0
      ? 'This study has models (and perhaps fits) built on its data; delete them first, or start a new study for other data.'
      : null,
  async (manager, studyId) =>
    (await manager.getRepository(BatchEntity).countBy({ studyId })) > 0
      ? 'This study has simulation batches compared with its data; start a new study to use other data.'
      : null,
];
