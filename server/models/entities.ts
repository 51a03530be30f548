/**
 * Model tables: the ModelSpec (what to estimate) and the Fit (one estimation or hand-entered set of
 * values, with its results). Specs and results are JSON text: they are read whole and never queried
 * by their parts.
 */
import { EntitySchema } from 'typeorm';
import type { Study } from '../studies/entities';
import type { User } from '../auth/entities';
import type { Job } from '../jobs/entities';

export interface ModelSpecRow {
  id: number;
  studyId: number;
  name: string;
  description: string;
  /** { rates: RateSpec[], effects: EffectSpecInput[] } as JSON (shared/models.ts). */
  spec: string;
  createdById: number | null;
  createdAt: Date;
  updatedAt: Date;
  study?: Study;
  createdBy?: User | null;
}

export const ModelSpecEntity = new EntitySchema<ModelSpecRow>({
  name: 'ModelSpec',
  tableName: 'model_specs',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    name: { type: 'varchar', length: 120 },
    description: { type: 'text', default: '' },
    spec: { type: 'text' },
    createdById: { type: 'integer', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
    updatedAt: { type: 'datetime', updateDate: true },
  },
  relations: {
    study: {
      type: 'many-to-one',
      target: 'Study',
      joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_model_specs_study' },
      onDelete: 'CASCADE',
    },
    createdBy: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'createdById', foreignKeyConstraintName: 'FK_model_specs_created_by' },
      onDelete: 'SET NULL',
      nullable: true,
    },
  },
  indices: [{ name: 'IDX_model_specs_study', columns: ['studyId'] }],
});

export interface FitRow {
  id: number;
  studyId: number;
  modelId: number;
  jobId: number | null;
  /** 'estimate' | 'fixed' */
  mode: string;
  /** queued | running | done | failed | cancelled (mirrors the job while it runs). */
  state: string;
  seed: number;
  phase3Runs: number;
  startFromId: number | null;
  /** The model's spec when the fit was made, as JSON (later edits of the model do not change it). */
  spec: string;
  /** Starting values and, when continuing, the earlier derivative matrix, as JSON. */
  plan: string;
  /** FitResults JSON (shared/models.ts) once done; null otherwise. */
  results: string | null;
  error: string | null;
  createdById: number | null;
  createdAt: Date;
  finishedAt: Date | null;
  study?: Study;
  model?: ModelSpecRow;
  job?: Job | null;
  createdBy?: User | null;
}

export const FitEntity = new EntitySchema<FitRow>({
  name: 'Fit',
  tableName: 'fits',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    modelId: { type: 'integer' },
    jobId: { type: 'integer', nullable: true },
    mode: { type: 'varchar', length: 16 },
    state: { type: 'varchar', length: 16 },
    seed: { type: 'integer' },
    phase3Runs: { type: 'integer' },
    startFromId: { type: 'integer', nullable: true },
    spec: { type: 'text' },
    plan: { type: 'text' },
    results: { type: 'text', nullable: true },
    error: { type: 'text', nullable: true },
    createdById: { type: 'integer', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
    finishedAt: { type: 'datetime', nullable: true },
  },
  relations: {
    study: {
      type: 'many-to-one',
      target: 'Study',
      joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_fits_study' },
      onDelete: 'CASCADE',
    },
    model: {
      type: 'many-to-one',
      target: 'ModelSpec',
      joinColumn: { name: 'modelId', foreignKeyConstraintName: 'FK_fits_model' },
      onDelete: 'CASCADE',
    },
    job: {
      type: 'many-to-one',
      target: 'Job',
      joinColumn: { name: 'jobId', foreignKeyConstraintName: 'FK_fits_job' },
      onDelete: 'SET NULL',
      nullable: true,
    },
    createdBy: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'createdById', foreignKeyConstraintName: 'FK_fits_created_by' },
      onDelete: 'SET NULL',
      nullable: true,
    },
  },
  indices: [
    { name: 'IDX_fits_model', columns: ['modelId'] },
    { name: 'IDX_fits_study', columns: ['studyId'] },
  ],
});

export const modelEntities = [ModelSpecEntity, FitEntity];
