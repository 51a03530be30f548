/**
 * Wave: one observation of a study's network. `index` counts from 1 (wave 1, wave 2, ...).
 * `adjacency` holds n*n bytes, row-major (sender row, receiver column, actor order of Actor.index):
 * 0 no tie, 1 tie, 2 missing (TIE_ABSENT / TIE_PRESENT / TIE_MISSING in server/data/parse.ts).
 */
import { EntitySchema } from 'typeorm';
import type { DataFormat } from '../../../shared/data';

export interface Wave {
  id: number;
  studyId: number;
  index: number;
  label: string;
  actorCount: number;
  adjacency: Buffer;
  /** The format the wave was uploaded in. */
  sourceFormat: DataFormat;
  /** n*n bytes, 1 where the pair's tie is fixed at this wave (a structural zero or one); null when none is. */
  fixed: Buffer | null;
  /** n bytes, 1 where the actor is present at this wave; null when every actor always is. */
  present: Buffer | null;
  createdAt: Date;
}

export const WaveEntity = new EntitySchema<Wave>({
  name: 'Wave',
  tableName: 'waves',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    index: { type: 'integer' },
    label: { type: 'varchar', length: 60 },
    actorCount: { type: 'integer' },
    adjacency: { type: 'blob' },
    sourceFormat: { type: 'varchar', length: 20 },
    fixed: { type: 'blob', nullable: true },
    present: { type: 'blob', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
  },
  uniques: [{ name: 'UQ_waves_study_index', columns: ['studyId', 'index'] }],
  foreignKeys: [
    { name: 'FK_waves_study', target: 'Study', columnNames: ['studyId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
  ],
});
