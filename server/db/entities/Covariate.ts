/**
 * Covariate: an actor attribute. `values` is JSON: one array of n values (actor order of Actor.index)
 * for a constant covariate, one per wave for a changing one; numbers, category labels or null (missing).
 */
import { EntitySchema } from 'typeorm';
import type { CovariateKind } from '../../../shared/data';

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
