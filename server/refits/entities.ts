/**
 * Re-fit study tables: the study (which fits, copied specs and values, seed, size) and one compact row
 * per re-fit (estimates and standard errors as Float64Array blobs, convergence figures).
 */
import { EntitySchema } from 'typeorm';
import type { Study } from '../studies/entities';
import type { User } from '../auth/entities';
import type { Job } from '../jobs/entities';

export interface Refit {
  id: number;
  studyId: number;
  jobId: number | null;
  createdById: number | null;
  label: string;
  /** StoredRefitModel[] JSON (./context.ts): each chosen fit's spec, values and derivative. */
  models: string;
  replications: number;
  cross: boolean;
  seed: number;
  phase3Runs: number;
  createdAt: Date;
  study?: Study;
  job?: Job | null;
  createdBy?: User | null;
}

export interface RefitResult {
  refitId: number;
  chunkIndex: number;
  source: number;
  target: number;
  replication: number;
  /** 1 when the estimation finished, 0 when it failed (then estimates and ses are empty). */
  finished: boolean;
  converged: boolean;
  maxAbsT: number | null;
  tauMax: number | null;
  /** Float64Array of the target model's parameters (keys order). */
  estimates: Buffer;
  /** Float64Array, NaN where no standard error. */
  ses: Buffer;
  seconds: number;
  error: string | null;
  refit?: Refit;
}

export const RefitEntity = new EntitySchema<Refit>({
  name: 'Refit',
  tableName: 'refits',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    jobId: { type: 'integer', nullable: true },
    createdById: { type: 'integer', nullable: true },
    label: { type: 'varchar', length: 120 },
    models: { type: 'text' },
    replications: { type: 'integer' },
    cross: { type: 'boolean' },
    seed: { type: 'integer' },
    phase3Runs: { type: 'integer' },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    study: { type: 'many-to-one', target: 'Study', joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_refits_study' }, onDelete: 'CASCADE' },
    job: { type: 'many-to-one', target: 'Job', joinColumn: { name: 'jobId', foreignKeyConstraintName: 'FK_refits_job' }, onDelete: 'SET NULL', nullable: true },
    createdBy: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'createdById', foreignKeyConstraintName: 'FK_refits_created_by' },
      onDelete: 'SET NULL',
      nullable: true,
    },
  },
  indices: [{ name: 'IDX_refits_study', columns: ['studyId'] }],
});

export const RefitResultEntity = new EntitySchema<RefitResult>({
  name: 'RefitResult',
  tableName: 'refit_results',
  columns: {
    refitId: { type: 'integer', primary: true },
    chunkIndex: { type: 'integer', primary: true },
    source: { type: 'integer' },
    target: { type: 'integer' },
    replication: { type: 'integer' },
    finished: { type: 'boolean' },
    converged: { type: 'boolean' },
    maxAbsT: { type: 'real', nullable: true },
    tauMax: { type: 'real', nullable: true },
    estimates: { type: 'blob' },
    ses: { type: 'blob' },
    seconds: { type: 'real' },
    error: { type: 'text', nullable: true },
  },
  relations: {
    refit: { type: 'many-to-one', target: 'Refit', joinColumn: { name: 'refitId', foreignKeyConstraintName: 'FK_refit_results_refit' }, onDelete: 'CASCADE' },
  },
});
