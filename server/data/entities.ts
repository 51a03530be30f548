/**
 * The study data's tables: actors, waves and covariates. All belong to a study and go with it
 * (created by ./migration.ts).
 *
 * Wave: one observation of a study's network. `index` counts from 1 (wave 1, wave 2, ...).
 * `adjacency` holds n*n bytes, row-major (sender row, receiver column, actor order of Actor.index):
 * 0 no tie, 1 tie, 2 missing (TIE_ABSENT / TIE_PRESENT / TIE_MISSING in server/data/parse.ts).
 */
import { EntitySchema } from 'typeorm';
import type { CovariateKind, DataFormat } from '../../shared/data';

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

/** Actor: one member of a study's network; `index` is the actor's row/column in every wave's matrix (from 0). */
export interface Actor {
  id: number;
  studyId: number;
  index: number;
  label: string;
}

export const ActorEntity = new EntitySchema<Actor>({
  name: 'Actor',
  tableName: 'actors',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    index: { type: 'integer' },
    label: { type: 'varchar', length: 60 },
  },
  uniques: [
    { name: 'UQ_actors_study_index', columns: ['studyId', 'index'] },
    { name: 'UQ_actors_study_label', columns: ['studyId', 'label'] },
  ],
  foreignKeys: [
    { name: 'FK_actors_study', target: 'Study', columnNames: ['studyId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
  ],
});

/**
 * Covariate: an actor attribute. `values` is JSON: one array of n values (actor order of Actor.index)
 * for a constant covariate, one per wave for a changing one; numbers, category labels or null (missing).
 */
export interface Covariate {
  id: number;
  studyId: number;
  name: string;
  kind: CovariateKind;
  changing: boolean;
  values: Array<Array<number | string | null>>;
  /** Sorted category labels (categorical only). */
  categories: string[];
}

export const CovariateEntity = new EntitySchema<Covariate>({
  name: 'Covariate',
  tableName: 'covariates',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    name: { type: 'varchar', length: 60 },
    kind: { type: 'varchar', length: 20 },
    changing: { type: 'boolean', default: false },
    values: { type: 'simple-json' },
    categories: { type: 'simple-json' },
  },
  uniques: [{ name: 'UQ_covariates_study_name', columns: ['studyId', 'name'] }],
  foreignKeys: [
    { name: 'FK_covariates_study', target: 'Study', columnNames: ['studyId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
  ],
});
