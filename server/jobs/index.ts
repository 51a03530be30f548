/** The job queue's public surface. See README.md. */
export { JOB_STATES, JobEntity, JobChunkEntity, type Job, type JobChunk, type JobState } from './entities';
export { registerJobKind, getJobKind, registeredJobKinds, type JobKind, type ChunkPlan, type JobInfo, type ChunkContext, type RunChunk, type SyncDb } from './registry';
export { JobQueue, defaultWorkerCount, type JobQueueOptions } from './queue';
export { jobQueueFor, startJobQueue, stopJobQueue, enqueueNow, backendFromEnv } from './queues';
export type { ChunkBackend, ChunkBackendEvents, ChunkTask } from './backend';
export { ThreadBackend } from './threads';
export { BullmqBackend, type BullmqBackendOptions } from './remote/bullmq';
export { createJobRow } from './rows';
export type { JobStatus } from './status';
export { inSyncTransaction, inSyncTransactionNow, parseSqlDate, sqlNow, syncDb } from '../db/sync';
