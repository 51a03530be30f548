/**
 * Batch tables: the batch (what to simulate, copied parameters, observed statistics), the simulated
 * statistic vectors per chunk and period (one Float64Array blob of chains x components), and the
 * per-tie frequency counts per period (one Int32Array blob, summed over chunks).
 */
import { EntitySchema } from 'typeorm';
import type { Study } from '../studies/entities';
import type { User } from '../auth/entities';
import type { Job } from '../jobs/entities';

export interface Batch {
  id: number;
  studyId: number;
  jobId: number | null;
  fitId: number | null;
  createdById: number | null;
  label: string;
  /** BatchModel JSON (shared/batches.ts). */
  model: string;
  /** Period numbers (from 1) as JSON. */
  periods: string;
  chains: number;
  seed: number;
  /** AuxStatisticId[] JSON. */
  statistics: string;
  /** { degree, distance } JSON. */
  maxima: string;
  /** StatisticLayout[] JSON. */
  layout: string;
  /** Observed vectors JSON: { [period]: { [statistic]: number[] } }. */
  observed: string;
  actorCount: number;
  createdAt: Date;
  study?: Study;
  job?: Job | null;
  createdBy?: User | null;
}

export const BatchEntity = new EntitySchema<Batch>({
  name: 'Batch',
  tableName: 'batches',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    jobId: { type: 'integer', nullable: true },
    fitId: { type: 'integer', nullable: true },
    createdById: { type: 'integer', nullable: true },
    label: { type: 'varchar', length: 120 },
    model: { type: 'text' },
    periods: { type: 'text' },
    chains: { type: 'integer' },
    seed: { type: 'integer' },
    statistics: { type: 'text' },
    maxima: { type: 'text' },
    layout: { type: 'text' },
    observed: { type: 'text' },
    actorCount: { type: 'integer' },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    study: { type: 'many-to-one', target: 'Study', joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_batches_study' }, onDelete: 'CASCADE' },
    job: { type: 'many-to-one', target: 'Job', joinColumn: { name: 'jobId', foreignKeyConstraintName: 'FK_batches_job' }, onDelete: 'SET NULL', nullable: true },
    createdBy: { type: 'many-to-one', target: 'User', joinColumn: { name: 'createdById', foreignKeyConstraintName: 'FK_batches_created_by' }, onDelete: 'SET NULL', nullable: true },
  },
  indices: [{ name: 'IDX_batches_study', columns: ['studyId'] }],
});

export interface BatchResult {
  batchId: number;
  period: number;
  chunkIndex: number;
  firstChain: number;
  chains: number;
  /** Float64Array, row-major chains x (sum of the layout's component counts). */
  data: Buffer;
  batch?: Batch;
}

export const BatchResultEntity = new EntitySchema<BatchResult>({
  name: 'BatchResult',
  tableName: 'batch_results',
  columns: {
    batchId: { type: 'integer', primary: true },
    period: { type: 'integer', primary: true },
    chunkIndex: { type: 'integer', primary: true },
    firstChain: { type: 'integer' },
    chains: { type: 'integer' },
    data: { type: 'blob' },
  },
  relations: {
    batch: { type: 'many-to-one', target: 'Batch', joinColumn: { name: 'batchId', foreignKeyConstraintName: 'FK_batch_results_batch' }, onDelete: 'CASCADE' },
  },
});

export interface BatchTieCounts {
  batchId: number;
  period: number;
  actors: number;
  /** Simulated end networks counted. */
  networks: number;
  /** Sum of their tie counts. */
  tieTotal: number;
  /** Int32Array n x n, row-major. */
  counts: Buffer;
  batch?: Batch;
}

export const BatchTieCountsEntity = new EntitySchema<BatchTieCounts>({
  name: 'BatchTieCounts',
  tableName: 'batch_tie_counts',
  columns: {
    batchId: { type: 'integer', primary: true },
    period: { type: 'integer', primary: true },
    actors: { type: 'integer' },
    networks: { type: 'integer' },
    tieTotal: { type: 'integer' },
    counts: { type: 'blob' },
  },
  relations: {
    batch: { type: 'many-to-one', target: 'Batch', joinColumn: { name: 'batchId', foreignKeyConstraintName: 'FK_batch_tie_counts_batch' }, onDelete: 'CASCADE' },
  },
});

/**
 * The goodness of fit of a finished batch, computed once (in a worker thread) and kept: one row per
 * period and set of coverages, the JSON of every statistic's GofResponse and simulated SDs
 * (server/batches/gofStore.ts). Only the default coverages are stored; other coverages stay in memory.
 */
export interface BatchGof {
  batchId: number;
  period: number;
  /** The coverages, as requested, joined by commas ("0.5,0.9"). */
  coverages: string;
  /** StatisticGof[] JSON. */
  results: string;
  batch?: Batch;
}

export const BatchGofEntity = new EntitySchema<BatchGof>({
  name: 'BatchGof',
  tableName: 'batch_gof',
  columns: {
    batchId: { type: 'integer', primary: true },
    period: { type: 'integer', primary: true },
    coverages: { type: 'varchar', length: 60, primary: true },
    results: { type: 'text' },
  },
  relations: {
    batch: { type: 'many-to-one', target: 'Batch', joinColumn: { name: 'batchId', foreignKeyConstraintName: 'FK_batch_gof_batch' }, onDelete: 'CASCADE' },
  },
});
