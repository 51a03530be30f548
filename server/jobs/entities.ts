/**
 * Job queue tables: one row per job (kind, payload, state, progress, log) and one row per finished
 * chunk, written in the same transaction as the chunk's results, so a restart knows exactly what is left.
 */
import { EntitySchema } from 'typeorm';

export const JOB_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type JobState = (typeof JOB_STATES)[number];

export interface Job {
  id: number;
  /** The registered kind, e.g. "batch" or "fit". */
  kind: string;
  /** The kind's input as JSON text. */
  payload: string;
  state: JobState;
  /** Work units done and planned (e.g. chains). */
  progressDone: number;
  progressTotal: number;
  chunksDone: number;
  chunksTotal: number;
  /** Plain-text log, one event a line (kept to the last 64 KB). */
  log: string;
  /** Number of times the job was started (1 on the first run; +1 on every resume after a restart). */
  attempts: number;
  /** The message of the error that failed the job. */
  error: string | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
  updatedAt: Date;
}

export const JobEntity = new EntitySchema<Job>({
  name: 'Job',
  tableName: 'jobs',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    kind: { type: 'varchar', length: 40 },
    payload: { type: 'text' },
    state: { type: 'varchar', length: 12, default: 'queued' },
    progressDone: { type: 'integer', default: 0 },
    progressTotal: { type: 'integer', default: 0 },
    chunksDone: { type: 'integer', default: 0 },
    chunksTotal: { type: 'integer', default: 0 },
    log: { type: 'text', default: '' },
    attempts: { type: 'integer', default: 0 },
    error: { type: 'text', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
    startedAt: { type: 'datetime', nullable: true },
    finishedAt: { type: 'datetime', nullable: true },
    updatedAt: { type: 'datetime', updateDate: true },
  },
  indices: [{ name: 'IDX_jobs_state', columns: ['state'] }],
});

export interface JobChunk {
  jobId: number;
  chunkIndex: number;
  /** Work units in the chunk. */
  units: number;
  /** Milliseconds the worker spent on it. */
  workMs: number;
  finishedAt: Date;
  job?: Job;
}

export const JobChunkEntity = new EntitySchema<JobChunk>({
  name: 'JobChunk',
  tableName: 'job_chunks',
  columns: {
    jobId: { type: 'integer', primary: true },
    chunkIndex: { type: 'integer', primary: true },
    units: { type: 'integer' },
    workMs: { type: 'integer', default: 0 },
    finishedAt: { type: 'datetime', createDate: true },
  },
  relations: {
    job: { type: 'many-to-one', target: 'Job', joinColumn: { name: 'jobId', foreignKeyConstraintName: 'FK_job_chunks_job' }, onDelete: 'CASCADE' },
  },
});
